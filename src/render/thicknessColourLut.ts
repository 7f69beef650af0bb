/**
 * A lookup table of film colour against thickness at a fine, uniform step, read by linear
 * interpolation: the renderer's way to avoid spectral integration per pixel. With the default
 * 0.5 nm step the interpolation error, about h²/8 · |d²RGB/dd²|, is below 1e-4 of full scale
 * for films with index up to 2.5 (fringe period ≥ 70 nm at 380 nm): under 0.03 of an 8-bit code.
 */
import type { Camera } from '../colour/camera.js';
import { filmColourTable } from '../colour/filmColourTable.js';
import type { Polarisation, Stack } from '../optics/types.js';

export interface ThicknessColourLut {
  readonly fromNm: number;
  readonly stepNm: number;
  /** Number of table rows (≥ 2). */
  readonly count: number;
  /** count × 3 linear RGB. */
  readonly rgbLinear: Float32Array;
}

export const DEFAULT_LUT_STEP_NM = 0.5;
export const MAX_LUT_ROWS = 2_000_000;

export function thicknessColourLut(
  stack: Stack,
  camera: Camera,
  minNm: number,
  maxNm: number,
  angleRad: number,
  options: { stepNm?: number; polarisation?: Polarisation; filmIndexScale?: number } = {},
): ThicknessColourLut {
  const stepNm = options.stepNm ?? DEFAULT_LUT_STEP_NM;
  if (!Number.isFinite(stepNm) || stepNm <= 0) throw new RangeError(`lut stepNm must be a finite number > 0, received ${stepNm}`);
  if (!(Number.isFinite(minNm) && Number.isFinite(maxNm) && minNm >= 0 && maxNm >= minNm)) {
    throw new RangeError(`thickness range must be finite with 0 <= min <= max, received ${minNm}..${maxNm}`);
  }
  const fromNm = Math.floor(minNm / stepNm) * stepNm;
  const count = Math.max(2, Math.ceil((maxNm - fromNm) / stepNm) + 1);
  if (count > MAX_LUT_ROWS) {
    throw new RangeError(`thickness range ${minNm}–${maxNm} nm at ${stepNm} nm needs ${count} table rows; expected at most ${MAX_LUT_ROWS} (use a coarser step)`);
  }
  const thicknessesNm = new Float64Array(count);
  for (let i = 0; i < count; i++) thicknessesNm[i] = fromNm + i * stepNm;
  const rgb = filmColourTable(stack, camera, thicknessesNm, angleRad, options.polarisation ?? 'mixed', options.filmIndexScale ?? 1);
  return { fromNm, stepNm, count, rgbLinear: Float32Array.from(rgb) };
}
