/**
 * The forward photo model shared by the renderer and the thickness mapper:
 *   encoded_c = encode( clamp01( exposure · (W(wbGain) · rgbLinear(d))_c + flare_c + noise_c ) )
 * rgbLinear is the camera's linear RGB of the film (./camera.ts); `exposure` is an overall gain;
 * `wbGain` are white-balance gains, applied where a camera applies them: on its own channels.
 * For a raw (linear) camera W is diag(gains). For an sRGB camera the gains act in the Bradford
 * cone space (Lam 1985; a sharpened cone space close to camera raw channels), so
 * W = P⁻¹·M⁻¹·diag(gains)·M·P with P = linear sRGB → XYZ and M the Bradford matrix: a white
 * balance left at another light is then exactly a set of gains (von Kries adaptation). `flare`
 * is an additive linear offset (veiling glare,
 * common practice to model it as a constant), `noise` Gaussian sensor noise of standard deviation
 * `noiseSigma` in linear units. `encode` is the sRGB transfer function (IEC 61966-2-1) for sRGB
 * cameras and the identity for linear (raw) cameras.
 */

import { ADAPTATION_MATRICES } from './chromaticAdaptation.js';
import { type Matrix3, diagonalMatrix3, invertMatrix3, multiplyMatrix3 } from './matrix3.js';
import { LINEAR_SRGB_TO_XYZ } from './srgb.js';

export interface PhotoFormation {
  readonly exposure: number;
  readonly whiteBalance: readonly [number, number, number];
  readonly flare: readonly [number, number, number];
}

export interface PhotoFormationInput {
  readonly exposure?: number;
  readonly whiteBalance?: readonly [number, number, number];
  /** A scalar applies to all three channels. */
  readonly flare?: number | readonly [number, number, number];
}

export const DEFAULT_PHOTO_FORMATION: PhotoFormation = { exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] };

/** Fills defaults and validates: exposure > 0, gains > 0, flare finite (may be negative, e.g. a dark offset). */
export function checkPhotoFormation(input: PhotoFormationInput = {}): PhotoFormation {
  const exposure = input.exposure ?? 1;
  if (typeof exposure !== 'number' || !Number.isFinite(exposure) || exposure <= 0) {
    throw new RangeError(`exposure must be a finite number > 0, received ${String(exposure)}`);
  }
  const whiteBalance = input.whiteBalance ?? [1, 1, 1];
  if (!Array.isArray(whiteBalance) || whiteBalance.length !== 3 || whiteBalance.some((g) => !Number.isFinite(g) || g <= 0)) {
    throw new RangeError(`whiteBalance must be three finite gains > 0, received ${JSON.stringify(whiteBalance)}`);
  }
  const rawFlare = input.flare ?? 0;
  const flare = typeof rawFlare === 'number' ? ([rawFlare, rawFlare, rawFlare] as const) : rawFlare;
  if (!Array.isArray(flare) || flare.length !== 3 || flare.some((f) => !Number.isFinite(f) || Math.abs(f) >= 1)) {
    throw new RangeError(`flare must be a finite number or three numbers with |flare| < 1 (linear units), received ${JSON.stringify(rawFlare)}`);
  }
  return { exposure, whiteBalance: [whiteBalance[0], whiteBalance[1], whiteBalance[2]], flare: [flare[0], flare[1], flare[2]] };
}

/** The white-balance matrix W(gains) described above (row-major 3×3). */
export function whiteBalanceMatrix(gains: readonly [number, number, number], encoding: 'srgb' | 'linear' = 'srgb'): Matrix3 {
  const diagonal = diagonalMatrix3(gains[0], gains[1], gains[2]);
  if (encoding === 'linear') return diagonal;
  const toCone = multiplyMatrix3(ADAPTATION_MATRICES.bradford, LINEAR_SRGB_TO_XYZ);
  return multiplyMatrix3(invertMatrix3(toCone), multiplyMatrix3(diagonal, toCone));
}

/**
 * Applies exposure and white balance to a table of linear RGB (n × 3): out = exposure·W·rgb.
 * Flare is added later, per pixel or per table entry.
 */
export function balanceTable(
  rgbLinear: Float64Array | Float32Array,
  p: PhotoFormation,
  encoding: 'srgb' | 'linear' = 'srgb',
  out: Float64Array = new Float64Array(rgbLinear.length),
): Float64Array {
  const w = whiteBalanceMatrix(p.whiteBalance, encoding);
  const e = p.exposure;
  for (let i = 0; i < rgbLinear.length; i += 3) {
    const r = rgbLinear[i];
    const g = rgbLinear[i + 1];
    const b = rgbLinear[i + 2];
    out[i] = e * (w[0] * r + w[1] * g + w[2] * b);
    out[i + 1] = e * (w[3] * r + w[4] * g + w[5] * b);
    out[i + 2] = e * (w[6] * r + w[7] * g + w[8] * b);
  }
  return out;
}

/**
 * Encoded pixel (0..1 per channel) predicted for a film colour: writes 3 values into `out` at
 * `offset`. `encode` maps clamped linear 0..1 to encoded 0..1 (e.g. createSrgbEncoder(), or the
 * identity for a linear camera).
 */
export function predictEncodedPixel(
  rgbLinear: ArrayLike<number>,
  p: PhotoFormation,
  encode: (linear: number) => number,
  out: Float64Array | Float32Array,
  offset = 0,
  encoding: 'srgb' | 'linear' = 'srgb',
): void {
  const balanced = balanceTable(Float64Array.of(rgbLinear[0], rgbLinear[1], rgbLinear[2]), p, encoding);
  for (let c = 0; c < 3; c++) {
    const v = balanced[c] + p.flare[c];
    out[offset + c] = encode(v < 0 ? 0 : v > 1 ? 1 : v);
  }
}

/** The identity encoding of linear (raw) cameras, with clamping to 0..1. */
export function encodeLinear(linear: number): number {
  return linear < 0 ? 0 : linear > 1 ? 1 : linear;
}
