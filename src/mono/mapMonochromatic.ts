/**
 * Entry point of the monochromatic mode: a photo taken under one spectral line (`line:546`, or
 * a light whose power sits within ~20 nm, see `isMonochromaticLight.ts`) → the same `MapResult`
 * as the colour mode, plus a `line` record with the intensity scale and how orders were counted.
 * The method is described in `mapLineIntensity.ts`; the free-film special case is the formula
 * of Scheludko (`scheludko.ts`). A narrow-band light (an SPD file) is modelled over its band
 * (`stackLineReflectance.ts`), so the fading of thick-film fringes is part of R(h).
 */
import { resolveLight } from '../colour/lights.js';
import type { MapOptions } from '../map/types.js';
import { LINE_MAX_WIDTH_NM, checkLineWavelength, narrowestPowerWindow, type SampledSpd } from './isMonochromaticLight.js';
import type { MonoPhoto } from './lineIntensity.js';
import { mapLineIntensity, type MonoMapResult } from './mapLineIntensity.js';
import { stackLineTable } from './stackLineReflectance.js';

/**
 * A light given as a narrow-band SPD (not a `line:` spec) is averaged over its band: the samples
 * within the 90 %-power window widened by half its width on each side.
 */
function narrowBandOf(light: string): { band: SampledSpd | null; bandHalfWidthNm?: number } {
  if (/^\s*line\s*:/i.test(light)) return { band: null };
  const resolved = resolveLight(light);
  if (resolved.kind === 'line') return { band: null };
  const band = { wavelengthsNm: resolved.wavelengthsNm, values: resolved.relativeSpd };
  const window = narrowestPowerWindow(band);
  if (window === null || window.toNm - window.fromNm >= LINE_MAX_WIDTH_NM) {
    throw new RangeError(`light ${light} is not monochromatic (90 % of its power spans ${window ? (window.toNm - window.fromNm).toFixed(0) : '?'} nm, more than ${LINE_MAX_WIDTH_NM} nm); map it in colour mode`);
  }
  return { band, bandHalfWidthNm: window.toNm - window.fromNm };
}

/**
 * `filmMask`: the decoded `options.maskPath` image (non-zero = film), when a mask is used; the
 * library does not read files here, so the caller decodes the mask.
 */
export function mapMonochromatic(
  photo: MonoPhoto & { readonly alpha?: Float32Array },
  options: MapOptions,
  lineNm: number,
  filmMask: Uint8Array | null = null,
): MonoMapResult {
  checkLineWavelength(lineNm);
  if (options.maskPath && filmMask === null) {
    throw new TypeError(`mapMonochromatic: options.maskPath is set (${options.maskPath}) but no decoded filmMask was passed`);
  }
  const table = stackLineTable(options.stack, lineNm, {
    angleRad: options.angleRad,
    maxThicknessNm: options.maxThicknessNm,
    filmIndexScale: options.filmIndexScale,
    ...narrowBandOf(options.light),
  });
  return mapLineIntensity(photo, options, table, filmMask);
}
