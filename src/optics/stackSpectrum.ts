/**
 * Single-thickness convenience over `filmSpectra`: R, T and A = 1 − R − T of the stack with its
 * film layer(s) at `thicknessNm`, for each wavelength.
 */
import { filmSpectra } from './filmSpectra.js';
import type { Polarisation, Stack } from './types.js';

export interface StackSpectrum {
  readonly reflectance: Float64Array;
  readonly transmittance: Float64Array;
  readonly absorptance: Float64Array;
}

export function stackSpectrum(
  stack: Stack,
  thicknessNm: number,
  wavelengthsNm: Float64Array,
  angleRad: number,
  polarisation: Polarisation,
  filmIndexScale = 1,
): StackSpectrum {
  if (typeof thicknessNm !== 'number' || !Number.isFinite(thicknessNm) || thicknessNm < 0) {
    throw new RangeError(`thicknessNm must be a finite number >= 0, received ${thicknessNm}`);
  }
  const { reflectance, transmittance } = filmSpectra(stack, {
    wavelengthsNm,
    thicknessesNm: Float64Array.of(thicknessNm),
    angleRad,
    polarisation,
    filmIndexScale,
  });
  const absorptance = new Float64Array(reflectance.length);
  for (let j = 0; j < absorptance.length; j++) absorptance[j] = 1 - reflectance[j] - transmittance[j];
  return { reflectance, transmittance, absorptance };
}
