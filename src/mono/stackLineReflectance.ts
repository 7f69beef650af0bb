/**
 * R(h) of a stack at one spectral line, through the project's transfer-matrix model
 * (`filmSpectra`, characteristic-matrix method after Macleod, Thin-Film Optical Filters, ch. 2).
 * Unpolarised light ('mixed') unless a polarisation is given: a line lamp or LED is unpolarised,
 * a laser often is not (check it).
 */
import { filmSpectra } from '../optics/filmSpectra.js';
import type { Polarisation, Stack } from '../optics/types.js';
import { checkLineWavelength } from './isMonochromaticLight.js';
import { buildLineReflectanceTable, type LineReflectanceTable, type ReflectanceOfThickness } from './lineReflectanceTable.js';

export interface LineTableOptions {
  readonly angleRad: number;
  readonly maxThicknessNm: number;
  readonly filmIndexScale?: number;
  readonly polarisation?: Polarisation;
  readonly stepNm?: number;
}

export function stackReflectanceAtLine(stack: Stack, lineNm: number, options: LineTableOptions): ReflectanceOfThickness {
  checkLineWavelength(lineNm);
  const wavelengthsNm = Float64Array.of(lineNm);
  return (thicknessesNm) =>
    filmSpectra(stack, {
      wavelengthsNm,
      thicknessesNm,
      angleRad: options.angleRad,
      polarisation: options.polarisation ?? 'mixed',
      filmIndexScale: options.filmIndexScale ?? 1,
    }).reflectance;
}

/** The tabulated branches of R(h) of `stack` at `lineNm` (see `lineReflectanceTable.ts`). */
export function stackLineTable(stack: Stack, lineNm: number, options: LineTableOptions): LineReflectanceTable {
  return buildLineReflectanceTable(stackReflectanceAtLine(stack, lineNm, options), lineNm, options.maxThicknessNm, options.stepNm ?? 0.25);
}
