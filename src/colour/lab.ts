/**
 * CIE 1976 L*a*b* (CIELAB), CIE 15:2004 §8.2.1, relative to a given reference white.
 * The CIE's exact constants are used: ε = (6/29)^3 = 216/24389 and κ = (29/3)^3 = 24389/27
 * (the published 0.008856 and 7.787 = κ/116 are their roundings, which make the function
 * discontinuous by ~1e-5 at the junction; the exact ratios avoid that).
 */

export const LAB_EPSILON = 216 / 24389;
export const LAB_KAPPA = 24389 / 27;

function f(t: number): number {
  return t > LAB_EPSILON ? Math.cbrt(t) : (LAB_KAPPA * t + 16) / 116;
}

function fInverse(ft: number): number {
  const cube = ft * ft * ft;
  return cube > LAB_EPSILON ? cube : (116 * ft - 16) / LAB_KAPPA;
}

/** XYZ → L*a*b* relative to `whiteXyz` (same scale as `xyz`, e.g. both with Y_white = 100). */
export function convertXyzToLab(xyz: ArrayLike<number>, whiteXyz: ArrayLike<number>): [number, number, number] {
  const fx = f(xyz[0] / whiteXyz[0]);
  const fy = f(xyz[1] / whiteXyz[1]);
  const fz = f(xyz[2] / whiteXyz[2]);
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

/** L*a*b* → XYZ relative to `whiteXyz` (inverse of convertXyzToLab). */
export function convertLabToXyz(lab: ArrayLike<number>, whiteXyz: ArrayLike<number>): [number, number, number] {
  const fy = (lab[0] + 16) / 116;
  const fx = fy + lab[1] / 500;
  const fz = fy - lab[2] / 200;
  const yr = lab[0] > LAB_KAPPA * LAB_EPSILON ? fy * fy * fy : lab[0] / LAB_KAPPA;
  return [fInverse(fx) * whiteXyz[0], yr * whiteXyz[1], fInverse(fz) * whiteXyz[2]];
}

/** Chroma C*ab and hue angle h_ab in degrees [0, 360) (CIE 15:2004 §8.2.1.2). */
export function convertLabToLch(lab: ArrayLike<number>): [number, number, number] {
  const chroma = Math.hypot(lab[1], lab[2]);
  let hueDeg = (Math.atan2(lab[2], lab[1]) * 180) / Math.PI;
  if (hueDeg < 0) hueDeg += 360;
  return [lab[0], chroma, hueDeg];
}
