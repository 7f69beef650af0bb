/**
 * Thickness uniformity figures as coating practice defines them (common practice; each named by
 * its formula, none a single vendor's):
 * - `(max-min)/(2*mean)`: half the range over the mean ("± uniformity");
 * - `std/mean`: the 1σ relative standard deviation (sample standard deviation, n − 1);
 * - `(max-min)/(max+min)`: the range over the sum of the extremes;
 * - `(p95-p05)/median`: the spread of the middle 90 % over the median (the map's earlier figure).
 * Percentiles by linear interpolation between order statistics (Hyndman & Fan 1996, type 7).
 */
import { percentileSelect } from '../map/statistics.js';

export interface UniformityFigures {
  readonly range_over_twice_mean: number | null;
  readonly std_over_mean: number | null;
  readonly range_over_sum: number | null;
  readonly p90_span_over_median: number | null;
}

/** The formula each figure is (JSON `uniformity_formulas`, report labels, summary.csv header). */
export const UNIFORMITY_FORMULAS: Readonly<Record<keyof UniformityFigures, string>> = {
  range_over_twice_mean: '(max-min)/(2*mean)',
  std_over_mean: 'std/mean (1 sigma)',
  range_over_sum: '(max-min)/(max+min)',
  p90_span_over_median: '(p95-p05)/median',
};

export interface ValueStatistics {
  readonly count: number;
  readonly mean_nm: number | null;
  readonly median_nm: number | null;
  readonly std_nm: number | null;
  readonly min_nm: number | null;
  readonly max_nm: number | null;
  readonly p05_nm: number | null;
  readonly p95_nm: number | null;
}

/** Statistics of `values` (finite numbers; reordered in place). */
export function valueStatistics(values: Float64Array): ValueStatistics {
  const n = values.length;
  if (n === 0) return { count: 0, mean_nm: null, median_nm: null, std_nm: null, min_nm: null, max_nm: null, p05_nm: null, p95_nm: null };
  let sum = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    sum += v;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const mean = sum / n;
  let squares = 0;
  for (let i = 0; i < n; i++) squares += (values[i] - mean) ** 2;
  return {
    count: n,
    mean_nm: mean,
    median_nm: percentileSelect(values, 50),
    std_nm: n > 1 ? Math.sqrt(squares / (n - 1)) : 0,
    min_nm: min,
    max_nm: max,
    p05_nm: percentileSelect(values, 5),
    p95_nm: percentileSelect(values, 95),
  };
}

/** The four figures from the statistics (null where a denominator is not positive or nothing was measured). */
export function uniformityOf(s: ValueStatistics): UniformityFigures {
  if (s.count === 0 || s.mean_nm === null || s.min_nm === null || s.max_nm === null) {
    return { range_over_twice_mean: null, std_over_mean: null, range_over_sum: null, p90_span_over_median: null };
  }
  const range = s.max_nm - s.min_nm;
  const ratio = (num: number, den: number): number | null => (den > 0 ? num / den : null);
  return {
    range_over_twice_mean: ratio(range, 2 * s.mean_nm),
    std_over_mean: ratio(s.std_nm ?? 0, s.mean_nm),
    range_over_sum: ratio(range, s.max_nm + s.min_nm),
    p90_span_over_median: ratio((s.p95_nm ?? 0) - (s.p05_nm ?? 0), s.median_nm ?? 0),
  };
}
