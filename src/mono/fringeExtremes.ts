/**
 * The film's own brightest and darkest fringes: intensity levels Imax and Imin for the
 * normalisation Δ = (I − Imin)/(Imax − Imin) of the formula of Scheludko.
 *
 * A pixel lies on a bright fringe (ridge) when, along one of four directions, the smoothed
 * intensity is not below its two next neighbours and exceeds the values d px away on both sides
 * by a contrast well above the noise, for some d of 3, 8, 20, 50, 120 or 300 px up to a third of
 * the frame (several scales, so narrow fringes and the broad fringes of a gentle slope in a large
 * photo are both seen); dark fringes (troughs) likewise. A fringe follows a line of equal
 * thickness, so along the crest (d px at right angles) the intensity must change by less than
 * half the contrast across it; a thickness turning point (the top of a swell whose height varies
 * along it) fails that test. A film that only brightens towards the frame edge has no ridge, so an
 * extreme is never guessed from the edge.
 * Thickness turning points (a dome or dimple between two extremes) also look like ridges or
 * troughs, but at intermediate levels: only ridges in the upper half and troughs in the lower half
 * of the intensity range count. Imax and Imin are medians of the raw intensity at those pixels
 * (medians are robust to noise; raw values avoid the flattening of peaks by smoothing).
 */

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

/**
 * Quantiles `qs` of `field` over usable pixels, from a 16384-bin histogram between the field's
 * extremes (resolution 1/16384 of the range, far below the pixel noise); NaN when no pixel.
 */
export function usableQuantiles(field: Float32Array, usable: Uint8Array, qs: readonly number[]): number[] {
  let lo = Infinity;
  let hi = -Infinity;
  let count = 0;
  for (let p = 0; p < field.length; p++) {
    if (!usable[p]) continue;
    const v = field[p];
    if (v < lo) lo = v;
    if (v > hi) hi = v;
    count++;
  }
  if (count === 0) return qs.map(() => NaN);
  if (!(hi > lo)) return qs.map(() => lo);
  const bins = 16384;
  const histogram = new Uint32Array(bins);
  const scale = bins / (hi - lo);
  for (let p = 0; p < field.length; p++) {
    if (usable[p]) histogram[Math.min(bins - 1, Math.floor((field[p] - lo) * scale))]++;
  }
  return qs.map((q) => {
    const target = q * count;
    let cumulative = 0;
    for (let i = 0; i < bins; i++) {
      if (cumulative + histogram[i] >= target) {
        const within = histogram[i] > 0 ? (target - cumulative) / histogram[i] : 0;
        return lo + (i + within) / scale;
      }
      cumulative += histogram[i];
    }
    return hi;
  });
}

function median(values: number[]): number {
  const s = Float64Array.from(values).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** Distances (px) at which the contrast of a crest or trough is tested. */
export const FRINGE_SCALES_PX: readonly number[] = [3, 8, 20, 50, 120, 300];

const DIRECTION_X = Int32Array.of(1, 0, 1, 1);
const DIRECTION_Y = Int32Array.of(0, 1, 1, -1);
/** Index of the direction at right angles to each of DIRECTION_X/Y. */
const PERPENDICULAR = Int32Array.of(1, 0, 3, 2);

/** Both (x ± ox, y ± oy) lie in the frame. */
function inside(x: number, y: number, ox: number, oy: number, width: number, height: number): boolean {
  const ax = Math.abs(ox);
  const ay = Math.abs(oy);
  return x - ax >= 0 && x + ax < width && y - ay >= 0 && y + ay < height;
}

export function findFringeExtremes(
  intensity: Float32Array,
  smoothed: Float32Array,
  width: number,
  height: number,
  usable: Uint8Array,
  smoothingRadius: number,
  /** Pixel noise from `estimatePixelNoise` (linear units). */
  noise: number,
  distancesPx: readonly number[] = FRINGE_SCALES_PX.filter((d) => d <= Math.max(3, Math.min(width, height) / 3)),
): FringeExtremes {
  let usableCount = 0;
  for (let p = 0; p < usable.length; p++) usableCount += usable[p];
  const [low, high] = usableQuantiles(smoothed, usable, [0.005, 0.995]);
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
      for (let k = 0; k < 4; k++) {
        const dx = DIRECTION_X[k];
        const dy = DIRECTION_Y[k];
        const step = dy * width + dx;
        if (!usable[p - step] || !usable[p + step]) continue;
        const a1 = smoothed[p - step];
        const b1 = smoothed[p + step];
        const crest = s > mid && s >= a1 && s >= b1;
        const bottom = s < mid && s <= a1 && s <= b1;
        if (!crest && !bottom) continue;
        // Broad fringes (gentle thickness gradients) only show their contrast further out.
        const ex = DIRECTION_X[PERPENDICULAR[k]];
        const ey = DIRECTION_Y[PERPENDICULAR[k]];
        for (let di = 0; di < distancesPx.length && !(isRidge && crest) && !(isTrough && bottom); di++) {
          const d = distancesPx[di];
          if (!inside(x, y, d * dx, d * dy, width, height) || !inside(x, y, d * ex, d * ey, width, height)) continue;
          const far = d * step;
          const along = d * (ey * width + ex);
          if (!usable[p - far] || !usable[p + far] || !usable[p - along] || !usable[p + along]) continue;
          // Contrast across the crest, and (a fringe runs along a line of equal thickness) hardly
          // any change along it: a thickness turning point changes along its ridge and fails.
          const across = crest ? Math.min(s - smoothed[p - far], s - smoothed[p + far]) : Math.min(smoothed[p - far] - s, smoothed[p + far] - s);
          if (across < contrast) continue;
          const alongChange = Math.max(Math.abs(smoothed[p - along] - s), Math.abs(smoothed[p + along] - s));
          if (alongChange > 0.5 * across) continue;
          if (crest) isRidge = true;
          else isTrough = true;
        }
      }
      if (isRidge) {
        ridge.push(intensity[p]);
        ridgeIndex.push(p);
      }
      if (isTrough) {
        trough.push(intensity[p]);
        troughIndex.push(p);
      }
    }
  }
  const needed = Math.max(8, Math.round(0.001 * usableCount));
  const found = ridge.length >= needed && trough.length >= needed;
  return {
    found,
    intensityMax: ridge.length > 0 ? median(ridge) : high,
    intensityMin: trough.length > 0 ? median(trough) : low,
    ridgePixels: ridge.length,
    troughPixels: trough.length,
    noise,
    ridgeIndex: Int32Array.from(ridgeIndex),
    troughIndex: Int32Array.from(troughIndex),
  };
}
