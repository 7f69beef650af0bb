/**
 * Statistics of a thickness map over its film pixels (the film area: inside the region or mask,
 * and, with `--film-area auto`, what was found to be film; excluded, not-film and undecided
 * pixels never count):
 * - mean, median, std, min, max, 5th/95th percentiles over pixels with an estimate;
 * - uniformity = (p95 − p05) / median (a common coating-uniformity figure; common practice);
 * - coverage = pixels with an estimate / film pixels;
 * - thin_fraction = (estimates below the threshold + too-dark pixels) /
 *   (pixels with an estimate + too-dark pixels): too-dark pixels ("thinner than the dark limit
 *   or no film") count as thin; pixels with no estimate for other reasons are left out.
 * Percentiles use linear interpolation between order statistics (Hyndman & Fan 1996, type 7,
 * as NumPy's default).
 */
import { type MapStatistics, PixelStatus } from './types.js';

export function computeMapStatistics(
  thicknessNm: Float32Array,
  status: Uint8Array,
  thinBelowNm: number | null,
  thinRegionCount: number,
): MapStatistics {
  let film = 0;
  let dark = 0;
  let thin = 0;
  let n = 0;
  for (let i = 0; i < status.length; i++) {
    const s = status[i];
    if (s === PixelStatus.excluded || s === PixelStatus.notFilm || s === PixelStatus.undecided) continue;
    film++;
    if (s === PixelStatus.dark) dark++;
    else if (s === PixelStatus.ok) n++;
  }
  const values = new Float32Array(n);
  let m = 0;
  let sum = 0;
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    const v = thicknessNm[i];
    values[m++] = v;
    sum += v;
    if (thinBelowNm !== null && v < thinBelowNm) thin++;
  }
  const coverage = film > 0 ? n / film : 0;
  const thinFraction = thinBelowNm === null || n + dark === 0 ? null : (thin + dark) / (n + dark);
  if (n === 0) {
    return {
      mean_nm: null, median_nm: null, std_nm: null, min_nm: null, max_nm: null, p05_nm: null,
      p95_nm: null, uniformity: null, coverage, thin_fraction: thinFraction, thin_regions: thinRegionCount, film_area_px: film,
    };
  }
  const mean = sum / n;
  let squares = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    squares += (v - mean) ** 2;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const median = percentileSelect(values, 50);
  const p05 = percentileSelect(values, 5);
  const p95 = percentileSelect(values, 95);
  return {
    mean_nm: mean,
    median_nm: median,
    std_nm: n > 1 ? Math.sqrt(squares / (n - 1)) : 0,
    min_nm: min,
    max_nm: max,
    p05_nm: p05,
    p95_nm: p95,
    uniformity: median > 0 ? (p95 - p05) / median : null,
    coverage,
    thin_fraction: thinFraction,
    thin_regions: thinRegionCount,
    film_area_px: film,
  };
}

/** Percentile (0–100) of ascending-sorted values, Hyndman & Fan type 7. */
export function percentileSorted(sorted: ArrayLike<number>, percent: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = ((n - 1) * percent) / 100;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Percentile (0–100), Hyndman & Fan type 7, of unsorted values by selection (Floyd & Rivest
 * style partitioning, O(n)); reorders `values` in place.
 */
export function percentileSelect(values: Float32Array | Float64Array, percent: number): number {
  const n = values.length;
  if (n === 0) return NaN;
  const h = ((n - 1) * percent) / 100;
  const lo = Math.floor(h);
  const a = selectKth(values, lo);
  if (lo + 1 >= n || h === lo) return a;
  // The next order statistic is the minimum of the part right of lo.
  let b = Infinity;
  for (let i = lo + 1; i < n; i++) if (values[i] < b) b = values[i];
  return a + (h - lo) * (b - a);
}

/** k-th smallest (0-based); afterwards values[0..k-1] ≤ values[k] ≤ values[k+1..]. */
export function selectKth(values: Float32Array | Float64Array, k: number): number {
  let left = 0;
  let right = values.length - 1;
  while (right > left) {
    const pivot = values[k];
    let i = left;
    let j = right;
    swap(values, left, k);
    if (values[right] > pivot) swap(values, right, left);
    while (i < j) {
      swap(values, i, j);
      i++;
      j--;
      while (values[i] < pivot) i++;
      while (values[j] > pivot) j--;
    }
    if (values[left] === pivot) swap(values, left, j);
    else {
      j++;
      swap(values, j, right);
    }
    if (j <= k) left = j + 1;
    if (k <= j) right = j - 1;
  }
  return values[k];
}

function swap(values: Float32Array | Float64Array, i: number, j: number): void {
  const t = values[i];
  values[i] = values[j];
  values[j] = t;
}

/** Histogram of the estimates on "nice" bin edges (start + i·step). */
export function thicknessHistogram(
  thicknessNm: Float32Array,
  status: Uint8Array,
  minNm: number | null,
  maxNm: number | null,
  targetBins = 40,
): { edgesNm: number[]; counts: number[] } {
  if (minNm === null || maxNm === null) return { edgesNm: [], counts: [] };
  const span = Math.max(maxNm - minNm, 1);
  const raw = span / targetBins;
  const magnitude = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 2.5, 5, 10].map((f) => f * magnitude).find((s) => s >= raw) ?? 10 * magnitude;
  const start = Math.floor(minNm / step) * step;
  const bins = Math.max(1, Math.ceil((maxNm - start) / step + 1e-9));
  const counts = new Array<number>(bins).fill(0);
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    let b = Math.floor((thicknessNm[i] - start) / step);
    if (b >= bins) b = bins - 1;
    if (b < 0) b = 0;
    counts[b]++;
  }
  const edgesNm = Array.from({ length: bins + 1 }, (_, i) => start + i * step);
  return { edgesNm, counts };
}
