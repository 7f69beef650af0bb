/**
 * Noise level of a photo from itself, as a function of brightness: the median absolute second
 * difference p[x−1] − 2·p[x] + p[x+1] of the green channel along rows, in 16 bins of encoded
 * luma, scaled to a Gaussian standard deviation (σ = MAD / (0.6745·√6), since the second
 * difference of white noise has variance 6σ² and the median of |N(0, s²)| is 0.6745·s —
 * common practice in robust statistics, e.g. Donoho & Johnstone 1994). The second difference
 * cancels smooth gradients, so dense fringes (a bubble's rings) do not pass for noise. Brightness
 * matters: sensor noise is roughly constant in linear units, and the sRGB curve stretches the
 * shadows, so dark pixels are noisier in encoded units. At most ~400k pairs are sampled.
 */
import { selectKth } from './statistics.js';
import { lumaOf } from './tableLimits.js';
import { type PhotoPixels, valueAt } from './photoPixels.js';

export const NOISE_BINS = 16;

export interface NoiseProfile {
  /** σ per luma bin (encoded units); bin b covers luma [b/16, (b+1)/16). */
  readonly sigmaByLuma: Float32Array;
  /** Median σ over all pairs. */
  readonly sigma: number;
}

export function estimateNoise(rgb: PhotoPixels, width: number, height: number, film: Uint8Array): NoiseProfile {
  const floor = 1 / 255 / Math.sqrt(12); // an 8-bit photo cannot be known better than a step/√12
  const pairs = width > 2 ? (width - 2) * height : 0;
  const stride = Math.max(1, Math.floor(pairs / 400_000));
  const capacity = Math.ceil(pairs / stride) + 1;
  const diffs = new Float32Array(capacity);
  const bins = new Uint8Array(capacity);
  let n = 0;
  for (let p = 0; p < pairs; p += stride) {
    const y = Math.floor(p / (width - 2));
    const x = p - y * (width - 2) + 1;
    const i = y * width + x;
    if (!film[i - 1] || !film[i] || !film[i + 1]) continue;
    const a = i * 3;
    diffs[n] = Math.abs(valueAt(rgb, a - 2) - 2 * valueAt(rgb, a + 1) + valueAt(rgb, a + 4));
    const luma = lumaOf(valueAt(rgb, a), valueAt(rgb, a + 1), valueAt(rgb, a + 2));
    bins[n] = Math.min(NOISE_BINS - 1, Math.floor(luma * NOISE_BINS));
    n++;
  }
  const toSigma = (mad: number): number => Math.max(mad / (0.6745 * Math.sqrt(6)), floor);
  if (n === 0) return { sigmaByLuma: new Float32Array(NOISE_BINS).fill(1 / 255), sigma: 1 / 255 };
  // Medians by selection (O(n)); the order of `diffs` is not needed afterwards.
  const sigma = toSigma(selectKth(diffs.slice(0, n), Math.floor(n / 2)));
  const sigmaByLuma = new Float32Array(NOISE_BINS).fill(NaN);
  const binCount = new Int32Array(NOISE_BINS + 1);
  for (let k = 0; k < n; k++) binCount[bins[k] + 1]++;
  for (let bin = 0; bin < NOISE_BINS; bin++) binCount[bin + 1] += binCount[bin];
  const grouped = new Float32Array(n);
  const fill = binCount.slice(0, NOISE_BINS);
  for (let k = 0; k < n; k++) grouped[fill[bins[k]]++] = diffs[k];
  for (let bin = 0; bin < NOISE_BINS; bin++) {
    const m = binCount[bin + 1] - binCount[bin];
    if (m < 50) continue;
    sigmaByLuma[bin] = toSigma(selectKth(grouped.subarray(binCount[bin], binCount[bin + 1]), Math.floor(m / 2)));
  }
  // Bins with too few pairs take the nearest measured bin (or the global value).
  for (let bin = 0; bin < NOISE_BINS; bin++) {
    if (sigmaByLuma[bin] === sigmaByLuma[bin]) continue;
    let value = sigma;
    for (let d = 1; d < NOISE_BINS; d++) {
      const lo = bin - d;
      const hi = bin + d;
      if (lo >= 0 && sigmaByLuma[lo] === sigmaByLuma[lo]) {
        value = sigmaByLuma[lo];
        break;
      }
      if (hi < NOISE_BINS && sigmaByLuma[hi] === sigmaByLuma[hi]) {
        value = sigmaByLuma[hi];
        break;
      }
    }
    sigmaByLuma[bin] = value;
  }
  return { sigmaByLuma, sigma };
}

/** σ (encoded units) expected for a pixel of the given encoded luma. */
export function sigmaAt(profile: NoiseProfile, luma: number): number {
  const bin = Math.min(NOISE_BINS - 1, Math.max(0, Math.floor(luma * NOISE_BINS)));
  return profile.sigmaByLuma[bin];
}
