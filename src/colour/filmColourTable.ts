/**
 * Colours of a film over a range of thicknesses: reflectance spectra from the optics engine
 * (transfer-matrix method, `filmSpectra`), folded through a camera's 3 × N weights. The result
 * is nThickness × 3 linear RGB, row-major. Thicknesses are processed in blocks so memory stays
 * bounded (block × N doubles) for long tables.
 */
import { filmSpectra } from '../optics/filmSpectra.js';
import type { Polarisation, Stack } from '../optics/types.js';
import type { Camera } from './camera.js';
import { applyWeightsToSpectra } from './colourTable.js';

const BLOCK = 1024;

/** Same as filmColourTable but with any 3 × N weights (e.g. xyzWeights for X, Y, Z) on `wavelengthsNm`. */
export function filmWeightedTable(
  stack: Stack,
  wavelengthsNm: Float64Array,
  weights: Float64Array,
  thicknessesNm: Float64Array,
  angleRad: number,
  polarisation: Polarisation = 'mixed',
  filmIndexScale = 1,
): Float64Array {
  if (!(thicknessesNm instanceof Float64Array)) throw new TypeError('thicknessesNm must be a Float64Array');
  if (weights.length !== 3 * wavelengthsNm.length) {
    throw new RangeError(`weights must hold 3 × ${wavelengthsNm.length} values, received ${weights.length}`);
  }
  const count = thicknessesNm.length;
  const out = new Float64Array(count * 3);
  for (let start = 0; start < count; start += BLOCK) {
    const block = thicknessesNm.subarray(start, Math.min(count, start + BLOCK));
    const { reflectance } = filmSpectra(stack, { wavelengthsNm, thicknessesNm: block, angleRad, polarisation, filmIndexScale });
    applyWeightsToSpectra(weights, reflectance, out.subarray(start * 3, (start + block.length) * 3));
  }
  return out;
}

/** Linear camera RGB of the film at each thickness (nThickness × 3, row-major), seen in reflection. */
export function filmColourTable(
  stack: Stack,
  camera: Camera,
  thicknessesNm: Float64Array,
  angleRad: number,
  polarisation: Polarisation = 'mixed',
  filmIndexScale = 1,
): Float64Array {
  return filmWeightedTable(stack, camera.wavelengthsNm, camera.weights, thicknessesNm, angleRad, polarisation, filmIndexScale);
}
