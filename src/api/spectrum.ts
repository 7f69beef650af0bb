/**
 * `spectrum`: the library's one call for what `lamella spectrum` does — reflectance,
 * transmittance and absorptance of a stack at one film thickness, in memory and as the file's text.
 */
import { resolveStack } from '../optics/resolveStack.js';
import { stackSpectrum, type StackSpectrum } from '../optics/stackSpectrum.js';
import type { Polarisation, Stack } from '../optics/types.js';
import { wavelengthGrid } from '../optics/wavelengthGrid.js';
import { spectrumCsv, spectrumRecord } from '../render/spectrumFiles.js';

export interface SpectrumJobOptions {
  /** The film stack: a preset name, a stack file, or a resolved Stack. */
  readonly stack: Stack | string;
  /** Film thickness, nm (>= 0). */
  readonly thicknessNm: number;
  /** Angle of incidence in the ambient (default 0). */
  readonly angleRad?: number;
  readonly polarisation?: Polarisation;
  /** Wavelength grid, nm (default 380–780 every 1). */
  readonly fromNm?: number;
  readonly toNm?: number;
  readonly stepNm?: number;
  /** Which text to make (default csv). */
  readonly format?: 'csv' | 'json';
}

export interface SpectrumResult extends StackSpectrum {
  readonly wavelengthsNm: Float64Array;
  /** The file's content: the CSV table or the JSON record. */
  readonly text: string;
}

/**
 * Computes the spectra of a stack at one film thickness (transfer-matrix method) and the file
 * `lamella spectrum` would write.
 *
 * @param options the stack, the film thickness, the wavelength grid and the format
 * @returns reflectance, transmittance and absorptance (fractions 0–1) per wavelength, and the file's text
 * @throws RangeError for a negative thickness or a bad wavelength grid; DataFileError for a bad stack or material file
 * @example
 * const { wavelengthsNm, reflectance } = spectrum({ stack: 'oxide-on-silicon', thicknessNm: 100 });
 */
export function spectrum(options: SpectrumJobOptions): SpectrumResult {
  const { thicknessNm } = options;
  if (!(Number.isFinite(thicknessNm) && thicknessNm >= 0)) throw new RangeError(`thicknessNm must be a finite number >= 0, received ${thicknessNm}`);
  const wavelengthsNm = wavelengthGrid(options.fromNm ?? 380, options.toNm ?? 780, options.stepNm ?? 1);
  const stack = typeof options.stack === 'string' ? resolveStack(options.stack) : options.stack;
  const angleRad = options.angleRad ?? 0;
  const polarisation = options.polarisation ?? 'mixed';
  const spectra = stackSpectrum(stack, thicknessNm, wavelengthsNm, angleRad, polarisation);
  const text =
    options.format === 'json'
      ? `${JSON.stringify(spectrumRecord(wavelengthsNm, spectra, { stack, thicknessNm, angleRad, polarisation }), null, 2)}\n`
      : spectrumCsv(wavelengthsNm, spectra);
  return { ...spectra, wavelengthsNm, text };
}
