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
 * as NumPy's default). The order statistics are exact, found in two passes over the map without
 * copying it: a histogram of the top 16 bits of each value's sort key, then, within the few top
 * bins that hold a wanted rank, a histogram of the low 16 bits. Maps of at most 2¹⁸ pixels sort a
 * copy of their estimates instead (cheaper there; the same values).
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
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  // Pass 1: counts, sum, extremes, and a histogram of the top 16 bits of each estimate's sort key.
  const bits = new Uint32Array(thicknessNm.buffer, thicknessNm.byteOffset, thicknessNm.length);
  // A small map's order statistics come from a sorted copy instead (SMALL_MAP_PX).
  const small = status.length <= SMALL_MAP_PX;
  const high = new Uint32Array(small ? 0 : KEY_BINS);
  for (let i = 0; i < status.length; i++) {
    const s = status[i];
    if (s === PixelStatus.excluded || s === PixelStatus.notFilm || s === PixelStatus.undecided) continue;
    film++;
    if (s === PixelStatus.dark) {
      dark++;
      continue;
    }
    if (s !== PixelStatus.ok) continue;
    n++;
    const v = thicknessNm[i];
    sum += v;
    if (v < min) min = v;
    if (v > max) max = v;
    if (thinBelowNm !== null && v < thinBelowNm) thin++;
    if (!small) high[sortKey(bits[i]) >>> 16]++;
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
  const percents = [5, 50, 95];
  const ranks: number[] = [];
  for (const percent of percents) {
    const lo = Math.floor(((n - 1) * percent) / 100);
    ranks.push(lo, Math.min(n - 1, lo + 1));
  }
  // Pass 2: the squared deviations, and a histogram of the low 16 bits within each top bin that
  // holds a wanted rank: the exact order statistics without copying or sorting the estimates.
  const wanted = small ? orderStatisticsBySort(thicknessNm, status, n, ranks, mean) : orderStatistics(thicknessNm, bits, status, high, ranks, mean);
  const median = percentileOf(wanted.values, ranks, n, 50);
  const p05 = percentileOf(wanted.values, ranks, n, 5);
  const p95 = percentileOf(wanted.values, ranks, n, 95);
  return {
    mean_nm: mean,
    median_nm: median,
    std_nm: n > 1 ? Math.sqrt(wanted.squares / (n - 1)) : 0,
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

/**
 * Maps of at most this many pixels find their order statistics by sorting a copy of the
 * estimates: the two-level histogram's fixed cost (256 KiB of bins, and 256 KiB more per wanted
 * bin, zeroed on every call) outweighs a sort of a few hundred thousand values (measured: about
 * 11 ms of a 320×240 series frame's statistics). Both give the exact order statistics.
 */
const SMALL_MAP_PX = 1 << 18;

/** orderStatistics for a small map: the ok estimates copied in pixel order (the squared deviations summed in that order) and sorted. */
function orderStatisticsBySort(thicknessNm: Float32Array, status: Uint8Array, n: number, ranks: readonly number[], mean: number): { values: number[]; squares: number } {
  const estimates = new Float32Array(n);
  let squares = 0;
  let m = 0;
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    const v = thicknessNm[i];
    const d = v - mean;
    squares += d * d;
    estimates[m++] = v;
  }
  estimates.sort();
  const values: number[] = [];
  for (let r = 0; r < ranks.length; r++) values.push(estimates[ranks[r]]);
  return { values, squares };
}

/** Percentile (type 7) from the order statistics `values` found for `ranks` among n estimates. */
function percentileOf(values: readonly number[], ranks: readonly number[], n: number, percent: number): number {
  const h = ((n - 1) * percent) / 100;
  const lo = Math.floor(h);
  const a = values[ranks.indexOf(lo)];
  if (lo + 1 >= n || h === lo) return a;
  return a + (h - lo) * (values[ranks.indexOf(lo + 1)] - a);
}

const KEY_BINS = 1 << 16;

/** A float32's bits as an unsigned key in the order of the values (negatives flipped). */
function sortKey(bits: number): number {
  return (bits & 0x80000000) !== 0 ? ~bits >>> 0 : (bits | 0x80000000) >>> 0;
}

/** The float32 whose sort key this is. */
function fromSortKey(key: number): number {
  const bits = (key & 0x80000000) !== 0 ? key & 0x7fffffff : ~key >>> 0;
  return new Float32Array(Uint32Array.of(bits).buffer)[0];
}

/**
 * The values of the given ranks (0-based, ascending order) among the pixels with an estimate,
 * from the top-16-bit histogram `high`, and the sum of squared deviations from `mean` (in the
 * pixels' order, as a straight two-pass variance sums them).
 */
function orderStatistics(
  thicknessNm: Float32Array,
  bits: Uint32Array,
  status: Uint8Array,
  high: Uint32Array,
  ranks: readonly number[],
  mean: number,
): { values: number[]; squares: number } {
  const binOf = new Int32Array(ranks.length);
  const below = new Float64Array(ranks.length);
  const slotOfBin = new Int32Array(KEY_BINS).fill(-1);
  const slotBins: number[] = [];
  for (let r = 0; r < ranks.length; r++) {
    let cumulative = 0;
    let bin = 0;
    while (cumulative + high[bin] <= ranks[r]) cumulative += high[bin++];
    binOf[r] = bin;
    below[r] = cumulative;
    if (slotOfBin[bin] < 0) {
      slotOfBin[bin] = slotBins.length;
      slotBins.push(bin);
    }
  }
  const low = new Uint32Array(slotBins.length * KEY_BINS);
  let squares = 0;
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    const d = thicknessNm[i] - mean;
    squares += d * d;
    const key = sortKey(bits[i]);
    const slot = slotOfBin[key >>> 16];
    if (slot >= 0) low[slot * KEY_BINS + (key & 0xffff)]++;
  }
  // (Plain loops, no closures: a closure made per call reached V8's compiled code of this
  // function with no type feedback of its own, and threw it out for every map of a series.)
  const values: number[] = [];
  for (let r = 0; r < ranks.length; r++) {
    const base = slotOfBin[binOf[r]] * KEY_BINS;
    let cumulative = below[r];
    let k = 0;
    while (cumulative + low[base + k] <= ranks[r]) cumulative += low[base + k++];
    values.push(fromSortKey(((binOf[r] << 16) | k) >>> 0));
  }
  return { values, squares };
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
 * The values at ok pixels on a regular stride (every k-th from the first, k = ⌊ok pixels / cap⌋,
 * at least 1), copied into a new array; empty when no pixel is ok. For percentiles of a large map
 * where a regular sample does (the colour bar's range, the median colour cost).
 */
export function okValuesOnStride(values: Float32Array, status: Uint8Array, cap: number): Float32Array {
  let ok = 0;
  for (let i = 0; i < status.length; i++) if (status[i] === PixelStatus.ok) ok++;
  if (ok === 0) return new Float32Array(0);
  const stride = Math.max(1, Math.floor(ok / cap));
  const sample = new Float32Array(Math.ceil(ok / stride));
  // A countdown, not a division per pixel.
  let skip = 0;
  let n = 0;
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    if (skip > 0) skip--;
    else {
      sample[n++] = values[i];
      skip = stride - 1;
    }
  }
  return sample.subarray(0, n);
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
