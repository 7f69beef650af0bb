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

/**
 * Reflectance, transmittance and absorptance of a film stack at one film thickness, per
 * wavelength (the transfer-matrix method, `filmSpectra`): what `lamella spectrum` prints.
 *
 * @param stack the stack (`resolveStack('soap-film')`, a stack file, …)
 * @param thicknessNm the film layer's physical thickness, nm (≥ 0)
 * @param wavelengthsNm wavelengths in vacuum, nm
 * @param angleRad angle of incidence in the ambient medium
 * @param polarisation `s`, `p` or `mixed` (unpolarised: their mean)
 * @param filmIndexScale a factor on the film's refractive index (a calibration's), default 1
 * @example
 * const { reflectance } = stackSpectrum(resolveStack('oxide-on-silicon'), 100, Float64Array.of(450, 550, 650), 0, 'mixed');
 */
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
