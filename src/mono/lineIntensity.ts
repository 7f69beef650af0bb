/**
 * Photo → one linear intensity per pixel for single-line light.
 *
 * Pixel values are decoded with the sRGB transfer function (IEC 61966-2-1:1999, §5.3:
 * V ≤ 0.04045 → V/12.92, else ((V + 0.055)/1.055)^2.4) and the three channels are averaged.
 * Under one spectral line every channel is the same reflectance times its own gain plus flare
 * (common practice), so channels of a true line photo are linear in one another; a low
 * correlation between a channel and the mean says the light is probably not monochromatic.
 */
import { decodeSrgb } from '../colour/srgb.js';

/** The fields of a decoded photo this module uses (`Photo` from `src/io` fits). */
export interface MonoPhoto {
  readonly width: number;
  readonly height: number;
  /** Interleaved RGB, encoded 0..1. */
  readonly rgb: Float32Array;
  readonly isGrey?: boolean;
}

export interface LineIntensity {
  /** Linear intensity (mean of decoded channels), row-major. */
  readonly intensity: Float32Array;
  /** 1 where any channel is clipped at the top of the scale. */
  readonly saturated: Uint8Array;
  /** Per channel: linear fit channel ≈ slope · intensity + intercept over film pixels. */
  readonly channelSlope: [number, number, number];
  readonly channelIntercept: [number, number, number];
  /** Smallest Pearson correlation of a channel (with signal) with the mean intensity; 1 for grey. */
  readonly worstChannelCorrelation: number;
}

/** Encoded level at or above which a channel counts as clipped (254.5 / 255, common practice). */
export const CLIPPED_LEVEL = 254.5 / 255;


/** Intensities of `photo`; statistics use only pixels where `film` is non-zero. */
export function lineIntensityOf(photo: MonoPhoto, film: Uint8Array): LineIntensity {
  const { width, height, rgb } = photo;
  const n = width * height;
  if (!(rgb instanceof Float32Array) || rgb.length !== 3 * n) {
    throw new TypeError(`photo.rgb must be a Float32Array of ${3 * n} values (width ${width} × height ${height} × 3), received ${rgb?.length}`);
  }
  const intensity = new Float32Array(n);
  const saturated = new Uint8Array(n);
  // 4096-entry decoding table: exact to ~1e-4 of full scale, far below 8-bit steps.
  const size = 4096;
  const table = new Float32Array(size + 1);
  for (let i = 0; i <= size; i++) table[i] = decodeSrgb(i / size);
  const decode = (v: number): number => {
    const x = Math.min(1, Math.max(0, v)) * size;
    const i = Math.min(size - 1, Math.floor(x));
    return table[i] + (x - i) * (table[i + 1] - table[i]);
  };
  const sums = new Float64Array(9); // Σc (3), Σc·I (3), Σc² (3)
  let sumI = 0;
  let sumII = 0;
  let count = 0;
  for (let p = 0; p < n; p++) {
    const r = rgb[3 * p];
    const g = rgb[3 * p + 1];
    const b = rgb[3 * p + 2];
    if (r >= CLIPPED_LEVEL || g >= CLIPPED_LEVEL || b >= CLIPPED_LEVEL) saturated[p] = 1;
    const lr = decode(r);
    const lg = decode(g);
    const lb = decode(b);
    const i = (lr + lg + lb) / 3;
    intensity[p] = i;
    if (film[p] === 0 || saturated[p] === 1) continue;
    count++;
    sumI += i;
    sumII += i * i;
    sums[0] += lr; sums[1] += lg; sums[2] += lb;
    sums[3] += lr * i; sums[4] += lg * i; sums[5] += lb * i;
    sums[6] += lr * lr; sums[7] += lg * lg; sums[8] += lb * lb;
  }
  const slope: [number, number, number] = [1, 1, 1];
  const intercept: [number, number, number] = [0, 0, 0];
  let worst = 1;
  if (count > 1 && !photo.isGrey) {
    const meanI = sumI / count;
    const varI = sumII / count - meanI * meanI;
    const means = [sums[0] / count, sums[1] / count, sums[2] / count];
    const strongest = Math.max(...means);
    for (let c = 0; c < 3; c++) {
      const cov = sums[3 + c] / count - means[c] * meanI;
      const varC = sums[6 + c] / count - means[c] * means[c];
      slope[c] = varI > 0 ? cov / varI : 1;
      intercept[c] = means[c] - slope[c] * meanI;
      // A channel with almost no signal (e.g. blue under sodium light) carries only noise.
      if (means[c] < 0.05 * strongest || varI <= 0 || varC <= 0) continue;
      worst = Math.min(worst, cov / Math.sqrt(varI * varC));
    }
  }
  return { intensity, saturated, channelSlope: slope, channelIntercept: intercept, worstChannelCorrelation: worst };
}
