/**
 * How well the fitted photo-formation model explains the film's colours: the CIEDE2000 colour
 * difference (CIE 15:2004; Sharma, Wu & Dalal 2005) between each measured film pixel and the
 * model's colour at its estimated thickness, both read as sRGB (IEC 61966-2-1) under D65, on a
 * regular sample (every k-th film pixel, k = ⌊film pixels / 20,000⌋, at least 1: all of them up to
 * 40,000 film pixels, then between 20,000 and 40,000); and the share of film pixels whose colour matches no
 * thickness. The verdict thresholds are ours, set from the invented benchmark scenes: clean JPEG
 * photos of films give medians of 0.5–1.5 and 95th percentiles of 2–5; a camera picture style,
 * uneven light, a wrong light or stack give several times more.
 */
import { LINEAR_SRGB_TO_XYZ, SRGB_WHITE_XYZ } from '../colour/srgb.js';
import { createSrgbDecoder } from '../colour/srgbEncoderTable.js';
import { deltaE2000 } from '../colour/deltaE.js';
import { LAB_EPSILON, LAB_KAPPA } from '../colour/lab.js';
import { percentileSelect } from './statistics.js';
import { type FitQuality, PixelStatus } from './types.js';
import { type PhotoPixels, valueAt } from './photoPixels.js';

/** sRGB decoding from the shared table (../colour/srgbEncoderTable.ts: exact at 8- and 16-bit codes, within 1e-7 between). */
const decodeFast = createSrgbDecoder();

const MAX_SAMPLES = 20_000;
/** Verdict thresholds (ΔE2000 median, 95th percentile; unmatched share). */
export const FIT_QUALITY_GOOD = { median: 2, p95: 6, unmatched: 0.05 } as const;
export const FIT_QUALITY_POOR = { median: 4, p95: 12, unmatched: 0.2 } as const;

/** A finished map beside its photo and its model: what checks of the model against the photo read. */
export interface PhotoAndModel {
  /** Encoded photo colours (sRGB), n × 3. */
  readonly rgb: PhotoPixels;
  readonly status: Uint8Array;
  readonly thicknessNm: Float32Array;
  /** Predicted encoded colour per table entry, count × 3. */
  readonly predictedRgb: Float32Array;
  readonly startNm: number;
  readonly stepNm: number;
  /** Whether the photo's values are sRGB-encoded (else linear). */
  readonly encoded: boolean;
}

/** The model's encoded colour at a mapped thickness (linear between table entries), into `out`. */
export function modelColourAt(input: PhotoAndModel, thicknessNm: number, out: Float64Array): Float64Array {
  const { predictedRgb } = input;
  const count = predictedRgb.length / 3;
  const t = Math.min(count - 1.000001, Math.max(0, (thicknessNm - input.startNm) / input.stepNm));
  const k = Math.floor(t);
  const f = t - k;
  for (let c = 0; c < 3; c++) out[c] = predictedRgb[k * 3 + c] + f * (predictedRgb[k * 3 + 3 + c] - predictedRgb[k * 3 + c]);
  return out;
}

export interface FitQualityInput extends PhotoAndModel {
  /** Film pixels (the film area). */
  readonly filmAreaPx: number;
  /** Film pixels without an estimate because their colour matches no thickness. */
  readonly unmatchedPx: number;
}

export function fitQualityOf(input: FitQualityInput): FitQuality | null {
  const { rgb, status, thicknessNm } = input;
  if (input.filmAreaPx === 0) return null;
  let ok = 0;
  for (let i = 0; i < status.length; i++) if (status[i] === PixelStatus.ok) ok++;
  const unmatched = input.unmatchedPx / input.filmAreaPx;
  if (ok === 0) return { median_delta_e2000: null, p95_delta_e2000: null, unmatched_fraction: unmatched, verdict: unmatched > FIT_QUALITY_POOR.unmatched ? 'poor' : 'fair' };
  const stride = Math.max(1, Math.floor(ok / MAX_SAMPLES));
  const values = new Float64Array(Math.ceil(ok / stride));
  const photoLab = new Float64Array(3);
  const modelLab = new Float64Array(3);
  const model = new Float64Array(3);
  // Every stride-th film pixel from the first (a countdown, not a division per pixel).
  let skip = 0;
  let n = 0;
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    if (skip > 0) {
      skip--;
      continue;
    }
    skip = stride - 1;
    modelColourAt(input, thicknessNm[i], model);
    encodedToLab(valueAt(rgb, i * 3), valueAt(rgb, i * 3 + 1), valueAt(rgb, i * 3 + 2), input.encoded, photoLab);
    encodedToLab(model[0], model[1], model[2], input.encoded, modelLab);
    values[n++] = deltaE2000(modelLab, photoLab);
  }
  const sample = values.subarray(0, n);
  const median = percentileSelect(sample, 50);
  const p95 = percentileSelect(sample, 95);
  const verdict =
    median > FIT_QUALITY_POOR.median || p95 > FIT_QUALITY_POOR.p95 || unmatched > FIT_QUALITY_POOR.unmatched
      ? 'poor'
      : median <= FIT_QUALITY_GOOD.median && p95 <= FIT_QUALITY_GOOD.p95 && unmatched <= FIT_QUALITY_GOOD.unmatched
        ? 'good'
        : 'fair';
  return { median_delta_e2000: median, p95_delta_e2000: p95, unmatched_fraction: unmatched, verdict };
}

/** The plain-words warning for a poor fit. */
export function poorFitWarning(quality: FitQuality): string {
  const median = quality.median_delta_e2000 === null ? 'n/a' : quality.median_delta_e2000.toFixed(1);
  const p95 = quality.p95_delta_e2000 === null ? 'n/a' : quality.p95_delta_e2000.toFixed(1);
  return (
    `the model does not explain this photo's colours well (ΔE2000 median ${median}, 95th percentile ${p95}; ` +
    `${(100 * quality.unmatched_fraction).toFixed(1)} % of the film matches no thickness), so its thicknesses are doubtful. ` +
    'Likely causes: the camera\'s picture style (contrast or saturation boost), light falling off across the photo, ' +
    'a wrong --light or --stack, or a scene that is not a thin film. What helps: a reference sample with `lamella calibrate`, ' +
    'a linear photo (raw converted without a picture style), the right --light, or --mask / --region around the film'
  );
}

/** Encoded sRGB (or linear) → CIELAB relative to the D65 white (Y_white = 1). */
function encodedToLab(r: number, g: number, b: number, encoded: boolean, out: Float64Array): void {
  const lr = encoded ? decodeFast(clamp(r)) : clamp(r);
  const lg = encoded ? decodeFast(clamp(g)) : clamp(g);
  const lb = encoded ? decodeFast(clamp(b)) : clamp(b);
  const m = LINEAR_SRGB_TO_XYZ;
  const x = m[0] * lr + m[1] * lg + m[2] * lb;
  const y = m[3] * lr + m[4] * lg + m[5] * lb;
  const z = m[6] * lr + m[7] * lg + m[8] * lb;
  const fx = labF(x / SRGB_WHITE_XYZ[0]);
  const fy = labF(y / SRGB_WHITE_XYZ[1]);
  const fz = labF(z / SRGB_WHITE_XYZ[2]);
  out[0] = 116 * fy - 16;
  out[1] = 500 * (fx - fy);
  out[2] = 200 * (fy - fz);
}

function labF(t: number): number {
  return t > LAB_EPSILON ? Math.cbrt(t) : (LAB_KAPPA * t + 16) / 116;
}

function clamp(v: number): number {
  return v < 0 ? 0 : v > 1 ? 1 : v;
}
