/**
 * sRGB, IEC 61966-2-1:1999: primaries R (0.64, 0.33), G (0.30, 0.60), B (0.15, 0.06), white
 * D65 at (0.3127, 0.3290); transfer function 12.92·v for v ≤ 0.0031308, else
 * 1.055·v^(1/2.4) − 0.055 (decoding threshold 0.04045).
 * The XYZ↔RGB matrices are derived here from the primaries and white (the standard's own
 * definition); the standard's printed 4-decimal matrix is their rounding (agrees to 5e-5).
 * The derived matrix maps the sRGB white exactly to RGB (1, 1, 1).
 */
import { convertXyyToXyz } from './xyy.js';
import { type Matrix3, diagonalMatrix3, invertMatrix3, matrix3, multiplyMatrix3, applyMatrix3 } from './matrix3.js';

/** D65 white of sRGB, from the CIE's chromaticity (0.3127, 0.3290), Y = 1. */
export const SRGB_WHITE_XYZ: readonly [number, number, number] = convertXyyToXyz([0.3127, 0.329, 1]);

function primariesMatrix(): Matrix3 {
  const primaries = [
    [0.64, 0.33],
    [0.3, 0.6],
    [0.15, 0.06],
  ];
  const columns = primaries.map(([x, y]) => convertXyyToXyz([x, y, 1]));
  const p = matrix3([
    [columns[0][0], columns[1][0], columns[2][0]],
    [columns[0][1], columns[1][1], columns[2][1]],
    [columns[0][2], columns[1][2], columns[2][2]],
  ]);
  const s = applyMatrix3(invertMatrix3(p), SRGB_WHITE_XYZ);
  return multiplyMatrix3(p, diagonalMatrix3(s[0], s[1], s[2]));
}

/** Linear sRGB → XYZ (Y of white = 1). */
export const LINEAR_SRGB_TO_XYZ: Matrix3 = primariesMatrix();
/** XYZ (Y of white = 1) → linear sRGB. */
export const XYZ_TO_LINEAR_SRGB: Matrix3 = invertMatrix3(LINEAR_SRGB_TO_XYZ);

/** Encodes one linear value (no clamping; negative values are mirrored, as is common practice). */
export function encodeSrgb(linear: number): number {
  const magnitude = Math.abs(linear);
  const encoded = magnitude <= 0.0031308 ? 12.92 * magnitude : 1.055 * magnitude ** (1 / 2.4) - 0.055;
  return linear < 0 ? -encoded : encoded;
}

/** Decodes one encoded value to linear light. */
export function decodeSrgb(encoded: number): number {
  const magnitude = Math.abs(encoded);
  const linear = magnitude <= 0.04045 ? magnitude / 12.92 : ((magnitude + 0.055) / 1.055) ** 2.4;
  return encoded < 0 ? -linear : linear;
}

/** Linear value → 8-bit code (clamped to 0..1 first, rounded). */
export function linearToSrgb8(linear: number): number {
  return Math.round(encodeSrgb(Math.min(1, Math.max(0, linear))) * 255);
}

/** Linear value → 16-bit code (clamped to 0..1 first, rounded). */
export function linearToSrgb16(linear: number): number {
  return Math.round(encodeSrgb(Math.min(1, Math.max(0, linear))) * 65535);
}

export function srgb8ToLinear(code: number): number {
  return decodeSrgb(code / 255);
}

export function srgb16ToLinear(code: number): number {
  return decodeSrgb(code / 65535);
}

/** XYZ (Y_white = 1, D65-relative) → linear sRGB. */
export function convertXyzToLinearSrgb(xyz: ArrayLike<number>): [number, number, number] {
  return applyMatrix3(XYZ_TO_LINEAR_SRGB, xyz);
}

/** Linear sRGB → XYZ (Y_white = 1). */
export function convertLinearSrgbToXyz(rgb: ArrayLike<number>): [number, number, number] {
  return applyMatrix3(LINEAR_SRGB_TO_XYZ, rgb);
}

/** `#rrggbb` of an 8-bit triple. */
export function hexOfSrgb8(r8: number, g8: number, b8: number): string {
  return `#${[r8, g8, b8].map((v) => v.toString(16).padStart(2, '0')).join('')}`;
}
