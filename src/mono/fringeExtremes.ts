/**
 * The film's own brightest and darkest fringes: intensity levels Imax and Imin for the
 * normalisation Δ = (I − Imin)/(Imax − Imin) of the formula of Scheludko.
 *
 * A pixel lies on a bright fringe (ridge) when, along one of four directions, the smoothed
 * intensity is not below its two next neighbours and exceeds the values 3 or 8 px away on both
 * sides (two scales, for narrow and broad fringes) by a contrast well above the noise; dark fringes (troughs) likewise. A film that only
 * brightens towards the frame edge has no ridge, so an extreme is never guessed from the edge.
 * Thickness turning points (a dome or dimple between two extremes) also look like ridges or
 * troughs, but at intermediate levels: only ridges in the upper half and troughs in the lower half
 * of the intensity range count. Imax and Imin are medians of the raw intensity at those pixels
 * (medians are robust to noise; raw values avoid the flattening of peaks by smoothing).
 */
import { estimatePixelNoise } from './pixelNoise.js';

export interface FringeExtremes {
  /** True when enough ridge and trough pixels were found to fix the intensity scale. */
  readonly found: boolean;
  readonly intensityMax: number;
  readonly intensityMin: number;
  readonly ridgePixels: number;
  readonly troughPixels: number;
  /** Pixel noise (standard deviation, linear units; `pixelNoise.ts`). */
  readonly noise: number;
  /** Pixel indices of the bright and dark fringe pixels found (for a local envelope). */
  readonly ridgeIndex: Int32Array;
  readonly troughIndex: Int32Array;
}

function quantile(sorted: Float32Array, q: number): number {
  if (sorted.length === 0) return NaN;
  const x = q * (sorted.length - 1);
  const i = Math.floor(x);
  const j = Math.min(sorted.length - 1, i + 1);
  return sorted[i] + (x - i) * (sorted[j] - sorted[i]);
}

const DIRECTIONS: ReadonlyArray<readonly [number, number]> = [[1, 0], [0, 1], [1, 1], [1, -1]];

export function findFringeExtremes(
  intensity: Float32Array,
  smoothed: Float32Array,
  width: number,
  height: number,
  usable: Uint8Array,
  smoothingRadius: number,
  distancesPx: readonly number[] = [3, 8],
): FringeExtremes {
  const values: number[] = [];
  for (let p = 0; p < usable.length; p++) if (usable[p]) values.push(smoothed[p]);
  const sorted = Float32Array.from(values).sort();
  const low = quantile(sorted, 0.005);
  const high = quantile(sorted, 0.995);
  const noise = estimatePixelNoise(intensity, width, height, usable);
  const range = high - low;
  const none = new Int32Array(0);
  const nothing = { found: false, intensityMax: high, intensityMin: low, ridgePixels: 0, troughPixels: 0, noise, ridgeIndex: none, troughIndex: none };
  if (!(range > 0)) return nothing;
  const window = 2 * smoothingRadius + 1;
  const contrast = Math.max((4 * noise) / window, 0.02 * range);
  const mid = 0.5 * (low + high);
  const ridge: number[] = [];
  const trough: number[] = [];
  const ridgeIndex: number[] = [];
  const troughIndex: number[] = [];
  for (let y = 1; y < height - 1; y++) {
    for (let x = 1; x < width - 1; x++) {
      const p = y * width + x;
      if (!usable[p]) continue;
      const s = smoothed[p];
      let isRidge = false;
      let isTrough = false;
      for (const [dx, dy] of DIRECTIONS) {
        const step = dy * width + dx;
        if (!usable[p - step] || !usable[p + step]) continue;
        const a1 = smoothed[p - step];
        const b1 = smoothed[p + step];
        const crest = s > mid && s >= a1 && s >= b1;
        const bottom = s < mid && s <= a1 && s <= b1;
        if (!crest && !bottom) continue;
        // Broad fringes (gentle thickness gradients) only show their contrast further out.
        for (const d of distancesPx) {
          if (x - d * dx < 0 || x + d * dx >= width || y - d * Math.abs(dy) < 0 || y + d * Math.abs(dy) >= height) continue;
          const far = d * step;
          if (!usable[p - far] || !usable[p + far]) continue;
          const a = smoothed[p - far];
          const b = smoothed[p + far];
          if (crest && s - a >= contrast && s - b >= contrast) isRidge = true;
          if (bottom && a - s >= contrast && b - s >= contrast) isTrough = true;
        }
      }
      if (isRidge) ridge.push(intensity[p]), ridgeIndex.push(p);
      if (isTrough) trough.push(intensity[p]), troughIndex.push(p);
    }
  }
  const needed = Math.max(8, Math.round(0.001 * values.length));
  const found = ridge.length >= needed && trough.length >= needed;
  return {
    found,
    intensityMax: ridge.length > 0 ? quantile(Float32Array.from(ridge).sort(), 0.5) : high,
    intensityMin: trough.length > 0 ? quantile(Float32Array.from(trough).sort(), 0.5) : low,
    ridgePixels: ridge.length,
    troughPixels: trough.length,
    noise,
    ridgeIndex: Int32Array.from(ridgeIndex),
    troughIndex: Int32Array.from(troughIndex),
  };
}
