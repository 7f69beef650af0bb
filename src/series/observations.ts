/**
 * What a series observed, before anything it predicts: the first frame with a thin region (the
 * onset of black spots, the figure foam studies report), how fast the film was thinning over its
 * last frames (least-squares slope of the mean thickness), and a threshold crossing only where
 * the drainage laws agree and the extrapolation is short; otherwise the reason there is none.
 *
 * The rules (our own judgement, stated in the README): a prediction needs every fitted law of
 * that quantity to cross the threshold, their times within ±`AGREE_FRACTION` of their median
 * (times counted from the first frame), and that median no further from the first frame than
 * `MAX_EXTRAPOLATION` times the observed span. The fits table keeps every law's own answer.
 */
import type { DrainageFit } from './fits/fitDrainage.js';
import type { RuptureRecord } from './rupture.js';
import { rowHasFilm } from './rupture.js';
import type { SeriesRow } from './seriesRows.js';

export const AGREE_FRACTION = 0.15;
export const MAX_EXTRAPOLATION = 2;
/** Frames with film used for the recent thinning rate (the last ones). */
export const RATE_FRAMES = 10;

export interface SeriesObservations {
  /** The first frame (in time) whose film has a thin region, or null (none, or no threshold). */
  readonly first_thin: { readonly frame: string; readonly time_s: number } | null;
  /** Slope of the mean thickness over the last frames with film (nm/s; negative = thinning), or null (fewer than 3). */
  readonly recent_thinning: {
    readonly rate_nm_per_s: number;
    readonly standard_error_nm_per_s: number | null;
    readonly frames: number;
    readonly from_s: number;
    readonly to_s: number;
  } | null;
  /** One entry per fitted quantity (mean, min): a reliable crossing, or why there is none. */
  readonly predictions: ReadonlyArray<{
    readonly quantity: 'mean' | 'min';
    readonly threshold_nm: number;
    /** The agreed crossing time (median of the laws), or null with `reason`. */
    readonly time_s: number | null;
    readonly range_s: readonly [number, number] | null;
    readonly models: readonly string[];
    readonly extrapolated: boolean;
    readonly reason: string | null;
  }>;
}

function median(values: readonly number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

function slope(points: ReadonlyArray<readonly [number, number]>): { rate: number; se: number | null } {
  const n = points.length;
  const mt = points.reduce((s, p) => s + p[0], 0) / n;
  const mh = points.reduce((s, p) => s + p[1], 0) / n;
  let stt = 0;
  let sth = 0;
  for (const [t, h] of points) {
    stt += (t - mt) ** 2;
    sth += (t - mt) * (h - mh);
  }
  const rate = sth / stt;
  if (n < 3) return { rate, se: null };
  let rss = 0;
  for (const [t, h] of points) rss += (h - mh - rate * (t - mt)) ** 2;
  return { rate, se: Math.sqrt(rss / (n - 2) / stt) };
}

const round = (v: number, digits = 3): number => Number(v.toFixed(digits));

export function observeSeries(rows: readonly SeriesRow[], fits: readonly DrainageFit[], rupture: RuptureRecord | null): SeriesObservations {
  const ordered = [...rows].sort((a, b) => a.timeS - b.timeS);
  const withFilm = ordered.filter(rowHasFilm);
  const thin = withFilm.find((r) => r.thinRegions > 0);
  const recent = withFilm.filter((r) => r.meanNm !== null).slice(-RATE_FRAMES);
  let recentThinning: SeriesObservations['recent_thinning'] = null;
  if (recent.length >= 3 && recent[recent.length - 1].timeS > recent[0].timeS) {
    const { rate, se } = slope(recent.map((r) => [r.timeS, r.meanNm as number] as const));
    recentThinning = { rate_nm_per_s: round(rate), standard_error_nm_per_s: se === null ? null : round(se), frames: recent.length, from_s: recent[0].timeS, to_s: recent[recent.length - 1].timeS };
  }
  const t0 = ordered.length > 0 ? ordered[0].timeS : 0;
  const lastS = (rupture ? withFilm : ordered).at(-1)?.timeS ?? t0;
  const span = lastS - t0;
  const predictions: Array<SeriesObservations['predictions'][number]> = [];
  for (const quantity of ['mean', 'min'] as const) {
    const own = fits.filter((f) => f.quantity === quantity && f.crossing);
    if (own.length === 0) continue;
    const threshold = own[0].crossing!.thresholdNm;
    const models = own.map((f) => f.model);
    const none = (reason: string): void => void predictions.push({ quantity, threshold_nm: threshold, time_s: null, range_s: null, models, extrapolated: false, reason });
    const observed = own.find((f) => f.crossing!.observedS !== null)?.crossing!.observedS ?? null;
    if (observed !== null) {
      predictions.push({ quantity, threshold_nm: threshold, time_s: observed, range_s: [observed, observed], models, extrapolated: false, reason: 'observed: a frame is already below the threshold' });
      continue;
    }
    if (own.some((f) => f.crossing!.beyondRupture)) {
      none('the film ruptured before the laws reach the threshold');
      continue;
    }
    const times = own.map((f) => f.crossing!.timeS);
    const named = own.map((f, k) => `${f.model} ${times[k] === null ? 'never' : `${times[k]!.toFixed(1)} s`}`).join(', ');
    if (times.some((t) => t === null)) {
      none(`the laws disagree (${named})`);
      continue;
    }
    const ts = times as number[];
    const mid = median(ts);
    const fromStart = ts.map((t) => t - t0);
    const midFromStart = mid - t0;
    if (Math.max(...fromStart) - Math.min(...fromStart) > 2 * AGREE_FRACTION * Math.max(midFromStart, 1e-9)) {
      none(`the laws disagree (${named})`);
      continue;
    }
    if (span <= 0 || midFromStart > MAX_EXTRAPOLATION * span) {
      none(`too far beyond the frames (${named}; the frames span ${span.toFixed(1)} s)`);
      continue;
    }
    predictions.push({ quantity, threshold_nm: threshold, time_s: round(mid, 2), range_s: [round(Math.min(...ts), 2), round(Math.max(...ts), 2)], models, extrapolated: mid > lastS, reason: null });
  }
  return { first_thin: thin ? { frame: thin.frame, time_s: thin.timeS } : null, recent_thinning: recentThinning, predictions };
}
