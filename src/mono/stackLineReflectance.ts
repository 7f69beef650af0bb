/**
 * R(h) of a stack at one spectral line, or averaged over a narrow band, through the project's
 * transfer-matrix model (`filmSpectra`, characteristic-matrix method after Macleod, Thin-Film
 * Optical Filters, ch. 2). Unpolarised light ('mixed') unless a polarisation is given: a line lamp
 * or LED is unpolarised, a laser often is not (check it).
 *
 * Narrow band (a filtered LED, a broadened lamp line): the camera adds the reflected power over
 * the band, so R(h) is the power-weighted mean of R(h, λ) over the band's samples (the camera's
 * sensitivity is taken as flat across a band under ~20 nm; our approximation). Fringes of thick
 * films then lose contrast, as expected from the finite coherence length of the light (common
 * practice; checked in the tests against the Gaussian-band visibility formula).
 */
import { filmSpectra } from '../optics/filmSpectra.js';
import type { Polarisation, Stack } from '../optics/types.js';
import { LINE_RANGE_NM, checkLineWavelength, type SampledSpd } from './isMonochromaticLight.js';
import { buildLineReflectanceTable, type LineReflectanceTable, type ReflectanceOfThickness } from './lineReflectanceTable.js';

export interface LineTableOptions {
  readonly angleRad: number;
  readonly maxThicknessNm: number;
  readonly filmIndexScale?: number;
  readonly polarisation?: Polarisation;
  readonly stepNm?: number;
  /**
   * The light's SPD, when it is a narrow band rather than a line: samples within ±`bandHalfWidthNm`
   * of the line wavelength are averaged, weighted by their power.
   */
  readonly band?: SampledSpd | null;
  readonly bandHalfWidthNm?: number;
}

/** Wavelengths and weights of the band samples used (one sample for a line). */
export function bandSamples(lineNm: number, options: LineTableOptions): { wavelengthsNm: Float64Array; weights: Float64Array } {
  const band = options.band ?? null;
  if (band === null) return { wavelengthsNm: Float64Array.of(lineNm), weights: Float64Array.of(1) };
  const half = options.bandHalfWidthNm ?? 20;
  const wl: number[] = [];
  const w: number[] = [];
  for (let i = 0; i < band.wavelengthsNm.length; i++) {
    const x = band.wavelengthsNm[i];
    const v = band.values[i];
    if (Math.abs(x - lineNm) > half || x < LINE_RANGE_NM[0] || x > LINE_RANGE_NM[1] || !(v > 0)) continue;
    wl.push(x);
    w.push(v);
  }
  if (wl.length === 0) return { wavelengthsNm: Float64Array.of(lineNm), weights: Float64Array.of(1) };
  return { wavelengthsNm: Float64Array.from(wl), weights: Float64Array.from(w) };
}

export function stackReflectanceAtLine(stack: Stack, lineNm: number, options: LineTableOptions): ReflectanceOfThickness {
  checkLineWavelength(lineNm);
  const { wavelengthsNm, weights } = bandSamples(lineNm, options);
  const count = wavelengthsNm.length;
  let total = 0;
  for (let j = 0; j < count; j++) total += weights[j];
  return (thicknessesNm) => {
    const R = filmSpectra(stack, {
      wavelengthsNm,
      thicknessesNm,
      angleRad: options.angleRad,
      polarisation: options.polarisation ?? 'mixed',
      filmIndexScale: options.filmIndexScale ?? 1,
    }).reflectance;
    if (count === 1) return R;
    const out = new Float64Array(thicknessesNm.length);
    for (let i = 0; i < out.length; i++) {
      let s = 0;
      for (let j = 0; j < count; j++) s += weights[j] * R[i * count + j];
      out[i] = s / total;
    }
    return out;
  };
}

/** The tabulated branches of R(h) of `stack` at `lineNm` (see `lineReflectanceTable.ts`). */
export function stackLineTable(stack: Stack, lineNm: number, options: LineTableOptions): LineReflectanceTable {
  return buildLineReflectanceTable(stackReflectanceAtLine(stack, lineNm, options), lineNm, options.maxThicknessNm, options.stepNm ?? 0.25);
}
