/**
 * Map statistics (src/map/statistics.ts) against direct computations on hand-made arrays:
 * - percentiles: Hyndman & Fan (1996), "Sample quantiles in statistical packages", The American
 *   Statistician 50(4) 361–365, definition 7, written out here in its 1-based form
 *   Q(p) = x[j] + g·(x[j+1] − x[j]), j = ⌊(n−1)p⌋ + 1, g = (n−1)p − ⌊(n−1)p⌋;
 *   plus NumPy's documented example for numpy.percentile (its default method is type 7):
 *   percentile([[10, 7, 4], [3, 2, 1]], 50) = 3.5 (from memory);
 * - sample standard deviation with n − 1: NIST StRD univariate summary statistics, data set
 *   NumAcc1 (values 10000001, 10000003, 10000002; certified mean 10000002, standard deviation 1;
 *   from memory), which also catches a one-pass "sum of squares" formula losing digits;
 * - coverage and the thin fraction follow the definitions in types.ts: dark pixels count as thin,
 *   excluded pixels never count, other pixels without an estimate count against coverage only.
 */
import { describe, expect, it } from 'vitest';
import { computeMapStatistics, percentileSorted, thicknessHistogram } from '../src/map/statistics.js';
import { PixelStatus } from '../src/map/types.js';

/** Hyndman & Fan definition 7, 1-based as printed (independent of the code under test). */
function quantileType7(values: readonly number[], p: number): number {
  const x = [...values].sort((a, b) => a - b);
  const n = x.length;
  const h = (n - 1) * p;
  const j = Math.floor(h) + 1; // 1-based
  const g = h - Math.floor(h);
  const xj = x[j - 1];
  const xj1 = j < n ? x[j] : x[n - 1];
  return xj + g * (xj1 - xj);
}

function sampleStd(values: readonly number[]): number {
  const mean = values.reduce((s, v) => s + v, 0) / values.length;
  return Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (values.length - 1));
}

/** A status/thickness pair from a list of [status, thickness] entries (thickness NaN unless ok). */
function arrays(entries: ReadonlyArray<[number, number]>): { thickness: Float32Array; status: Uint8Array } {
  const thickness = new Float32Array(entries.length).fill(NaN);
  const status = new Uint8Array(entries.length);
  entries.forEach(([s, t], i) => {
    status[i] = s;
    if (s === PixelStatus.ok) thickness[i] = t;
  });
  return { thickness, status };
}

describe('map statistics', () => {
  it('percentiles follow Hyndman & Fan type 7 (NumPy example: median of 10,7,4,3,2,1 is 3.5)', () => {
    const numpyExample = Float64Array.from([10, 7, 4, 3, 2, 1]).sort();
    expect(percentileSorted(numpyExample, 50)).toBeCloseTo(3.5, 12);
    const values = [412.5, 37, 980, 5.25, 5.25, 611, 233, 233.5, 1500, 47, 48, 49, 301];
    const sorted = Float64Array.from(values).sort();
    for (const percent of [0, 1, 5, 12.5, 25, 50, 63, 75, 95, 99, 100]) {
      expect(percentileSorted(sorted, percent)).toBeCloseTo(quantileType7(values, percent / 100), 9);
    }
    expect(percentileSorted(Float64Array.of(42), 95)).toBe(42);
  });

  it('mean and n − 1 standard deviation match NIST StRD NumAcc1 (mean 10000002, sd 1)', () => {
    const { thickness, status } = arrays([
      [PixelStatus.ok, 10000001],
      [PixelStatus.ok, 10000003],
      [PixelStatus.ok, 10000002],
    ]);
    const stats = computeMapStatistics(thickness, status, null, 0);
    expect(stats.mean_nm).toBe(10000002);
    expect(stats.std_nm).toBeCloseTo(1, 9);
    expect(stats.median_nm).toBe(10000002);
  });

  it('every field equals a direct computation on a mixed hand-made map', () => {
    const entries: Array<[number, number]> = [];
    // 40 estimates on an uneven spread, 6 dark, 3 too thick, 4 ambiguous, 2 saturated, 9 excluded.
    for (let k = 0; k < 40; k++) entries.push([PixelStatus.ok, 20 + ((k * 37) % 41) * 13.5 + (k % 3) * 0.25]);
    for (let k = 0; k < 6; k++) entries.push([PixelStatus.dark, NaN]);
    for (let k = 0; k < 3; k++) entries.push([PixelStatus.tooThick, NaN]);
    for (let k = 0; k < 4; k++) entries.push([PixelStatus.ambiguous, NaN]);
    for (let k = 0; k < 2; k++) entries.push([PixelStatus.saturated, NaN]);
    for (let k = 0; k < 9; k++) entries.push([PixelStatus.excluded, NaN]);
    // Shuffle deterministically so that order does not matter.
    const shuffled = entries.map((e, i) => ({ e, key: (i * 7919) % 97 })).sort((a, b) => a.key - b.key).map((x) => x.e);
    const { thickness, status } = arrays(shuffled);
    const values = shuffled.filter(([s]) => s === PixelStatus.ok).map(([, t]) => Math.fround(t));
    const thinBelowNm = 100;
    const stats = computeMapStatistics(thickness, status, thinBelowNm, 2);

    const mean = values.reduce((s, v) => s + v, 0) / values.length;
    const median = quantileType7(values, 0.5);
    const p05 = quantileType7(values, 0.05);
    const p95 = quantileType7(values, 0.95);
    expect(stats.mean_nm).toBeCloseTo(mean, 9);
    expect(stats.std_nm).toBeCloseTo(sampleStd(values), 9);
    expect(stats.median_nm).toBeCloseTo(median, 9);
    expect(stats.p05_nm).toBeCloseTo(p05, 9);
    expect(stats.p95_nm).toBeCloseTo(p95, 9);
    expect(stats.min_nm).toBe(Math.min(...values));
    expect(stats.max_nm).toBe(Math.max(...values));
    expect(stats.uniformity).toBeCloseTo((p95 - p05) / median, 12);
    const film = 40 + 6 + 3 + 4 + 2; // excluded pixels are not film
    expect(stats.coverage).toBeCloseTo(40 / film, 15);
    const thinEstimates = values.filter((v) => v < thinBelowNm).length;
    expect(thinEstimates).toBeGreaterThan(0);
    expect(stats.thin_fraction).toBeCloseTo((thinEstimates + 6) / (40 + 6), 15);
    expect(stats.thin_regions).toBe(2);
  });

  it('no threshold gives no thin fraction; no estimates give nulls and coverage 0', () => {
    const some = arrays([[PixelStatus.ok, 300], [PixelStatus.dark, NaN], [PixelStatus.ok, 500]]);
    const a = computeMapStatistics(some.thickness, some.status, null, 0);
    expect(a.thin_fraction).toBeNull();
    expect(a.coverage).toBeCloseTo(2 / 3, 15);
    expect(a.std_nm).toBeCloseTo(sampleStd([300, 500]), 9);

    const none = arrays([[PixelStatus.dark, NaN], [PixelStatus.ambiguous, NaN], [PixelStatus.excluded, NaN]]);
    const b = computeMapStatistics(none.thickness, none.status, 50, 1);
    expect(b.mean_nm).toBeNull();
    expect(b.median_nm).toBeNull();
    expect(b.std_nm).toBeNull();
    expect(b.coverage).toBe(0);
    // Only the dark pixel is measured-or-dark, and it counts as thin.
    expect(b.thin_fraction).toBe(1);

    const single = arrays([[PixelStatus.ok, 250]]);
    const c = computeMapStatistics(single.thickness, single.status, 50, 0);
    expect(c.std_nm).toBe(0);
    expect(c.p05_nm).toBe(250);
    expect(c.thin_fraction).toBe(0);
  });

  it('the histogram counts every estimate once, on edges that span min..max', () => {
    const entries: Array<[number, number]> = [];
    for (let k = 0; k < 500; k++) entries.push([PixelStatus.ok, 100 + ((k * 131) % 500) * 1.7]);
    entries.push([PixelStatus.dark, NaN], [PixelStatus.excluded, NaN]);
    const { thickness, status } = arrays(entries);
    const stats = computeMapStatistics(thickness, status, null, 0);
    const h = thicknessHistogram(thickness, status, stats.min_nm, stats.max_nm);
    expect(h.counts.reduce((s, c) => s + c, 0)).toBe(500);
    expect(h.edgesNm.length).toBe(h.counts.length + 1);
    expect(h.edgesNm[0]).toBeLessThanOrEqual(stats.min_nm as number);
    expect(h.edgesNm[h.edgesNm.length - 1]).toBeGreaterThanOrEqual(stats.max_nm as number);
    // Direct recount of one bin.
    const lo = h.edgesNm[3];
    const hi = h.edgesNm[4];
    const direct = entries.filter(([s, t]) => s === PixelStatus.ok && Math.fround(t) >= lo && Math.fround(t) < hi).length;
    expect(h.counts[3]).toBe(direct);
  });

  it('exact percentiles without sorting: random maps with ties, negatives and huge spans agree with the type 7 definition on sorted values', () => {
    // A seeded generator (Park & Miller 1988 minimal standard; common practice) for repeatable maps.
    let seed = 12345;
    const next = (): number => (seed = (seed * 16807) % 2147483647) / 2147483647;
    // Up to 2^18 pixels the order statistics come from a sorted copy, above it from the two-level
    // histogram: both are checked (the last case is a 300,010-pixel map).
    for (const [n, spread] of [[1, 1], [2, 3], [7, 1000], [1000, 5], [20_000, 2000], [5000, 1e-3], [300_000, 800]] as const) {
      const thickness = new Float32Array(n + 10);
      const status = new Uint8Array(n + 10).fill(PixelStatus.ok);
      for (let i = 0; i < thickness.length; i++) {
        // Ties (rounded values), negatives and a few values far from the rest.
        const raw = (next() - 0.2) * spread;
        thickness[i] = i % 17 === 0 ? Math.round(raw) : i % 101 === 0 ? raw * 1e6 : raw;
      }
      for (let i = n; i < n + 10; i++) status[i] = i % 2 === 0 ? PixelStatus.dark : PixelStatus.ambiguous;
      const values = Array.from(thickness.subarray(0, n));
      const sorted = [...values].sort((a, b) => a - b);
      const stats = computeMapStatistics(thickness, status, null, 0);
      // (+ 0 makes −0 and +0 one value: they are equal as numbers and sort either way.)
      // Type 7 on the sorted values, with the same arithmetic for the rank (bit for bit).
      expect(stats.median_nm! + 0).toBe(percentileSorted(sorted, 50) + 0);
      expect(stats.p05_nm! + 0).toBe(percentileSorted(sorted, 5) + 0);
      expect(stats.p95_nm! + 0).toBe(percentileSorted(sorted, 95) + 0);
      expect(stats.median_nm!).toBeCloseTo(quantileType7(values, 0.5), 9);
      expect(stats.min_nm).toBe(values.reduce((a, b) => Math.min(a, b)));
      expect(stats.max_nm).toBe(values.reduce((a, b) => Math.max(a, b)));
    }
  });

  it('a large map (histogram) and a small one (sorted copy) holding the same estimates give the same statistics to the last bit', () => {
    let seed = 777;
    const next = (): number => (seed = (seed * 16807) % 2147483647) / 2147483647;
    const pixels = 400_000;
    const large = new Float32Array(pixels);
    const largeStatus = new Uint8Array(pixels).fill(PixelStatus.excluded);
    const kept: number[] = [];
    for (let i = 0; i < pixels; i++) {
      large[i] = 20 + 900 * next() ** 2;
      if (i % 3 === 0) {
        largeStatus[i] = PixelStatus.ok;
        kept.push(large[i]);
      }
    }
    expect(pixels).toBeGreaterThan(1 << 18);
    expect(kept.length).toBeLessThan(1 << 18);
    const small = Float32Array.from(kept);
    const smallStatus = new Uint8Array(small.length).fill(PixelStatus.ok);
    expect(computeMapStatistics(large, largeStatus, 100, 0)).toEqual(computeMapStatistics(small, smallStatus, 100, 0));
  });
});
