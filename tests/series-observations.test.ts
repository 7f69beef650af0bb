// What a series observed before what it predicts (src/series/observations.ts): the first frame with
// a thin region, the recent thinning rate (ordinary least-squares slope; the formula and its
// standard error are common practice, checked on a small example worked by hand), and a threshold
// crossing only where the drainage laws agree and the extrapolation is short (our own rules,
// stated in the README: laws within ±15 % of their median, at most 2× the observed span).
import { describe, expect, it } from 'vitest';
import { observeSeries } from '../src/series/observations.js';
import type { DrainageFit } from '../src/series/fits/fitDrainage.js';
import type { SeriesRow } from '../src/series/seriesRows.js';

function row(frame: string, timeS: number, meanNm: number, thinRegions = 0, filmFound = true): SeriesRow {
  return { frame, timeS, meanNm, medianNm: meanNm, minNm: meanNm / 2, maxNm: meanNm * 2, stdNm: 1, thinFraction: 0, thinRegions, coverage: 1, exposure: 1, darkLimitNm: 10, filmFound };
}

function fit(model: string, quantity: 'mean' | 'min', timeS: number | null, extra: Partial<NonNullable<DrainageFit['crossing']>> = {}): DrainageFit {
  return {
    model: model as DrainageFit['model'], formula: '', quantity, points: 10, parameters: {}, covariance: [], rSquared: 0.99, rmsNm: 1, converged: true, iterations: 5, warnings: [],
    crossing: { thresholdNm: 50, timeS, lowS: timeS, highS: timeS, extrapolated: timeS !== null && timeS > 20, belowAtStart: false, observedS: null, beyondRupture: false, ...extra },
  };
}

const rows = Array.from({ length: 21 }, (_, i) => row(`f${i}`, i, 500 - 10 * i, i >= 12 ? 1 : 0));

describe('series observations', () => {
  it('the first thin region is the first frame in time with one', () => {
    expect(observeSeries([...rows].reverse(), [], null).first_thin).toEqual({ frame: 'f12', time_s: 12 });
    expect(observeSeries(rows.map((r) => ({ ...r, thinRegions: 0 })), [], null).first_thin).toBeNull();
  });

  it('the recent thinning rate: the least-squares slope of the last 10 frames (exact on a line; hand-worked example with its standard error)', () => {
    const o = observeSeries(rows, [], null);
    expect(o.recent_thinning).toMatchObject({ rate_nm_per_s: -10, frames: 10, from_s: 11, to_s: 20 });
    expect(o.recent_thinning!.standard_error_nm_per_s).toBeCloseTo(0, 6);
    // (0,1), (1,3), (2,2), (3,5): slope Sxy/Sxx = 5.5/5 = 1.1; RSS 2.7; SE = √(2.7/2/5) = 0.5196.
    const small = [row('a', 0, 1), row('b', 1, 3), row('c', 2, 2), row('d', 3, 5)];
    const s = observeSeries(small, [], null).recent_thinning!;
    expect(s.rate_nm_per_s).toBeCloseTo(1.1, 3);
    expect(s.standard_error_nm_per_s).toBeCloseTo(0.5196, 3);
  });

  it('a prediction only where every law crosses, within ±15 % of their median, at most 2× the observed span from the first frame', () => {
    const agree = observeSeries(rows, [fit('exponential', 'mean', 30), fit('power-law', 'mean', 32), fit('reynolds', 'mean', 34)], null);
    expect(agree.predictions[0]).toMatchObject({ quantity: 'mean', time_s: 32, range_s: [30, 34], extrapolated: true, reason: null });
    const disagree = observeSeries(rows, [fit('exponential', 'mean', 941), fit('power-law', 'mean', 2433), fit('reynolds', 'mean', null)], null);
    expect(disagree.predictions[0].time_s).toBeNull();
    expect(disagree.predictions[0].reason).toBe('the laws disagree (exponential 941.0 s, power-law 2433.0 s, reynolds never)');
    const far = observeSeries(rows, [fit('exponential', 'mean', 60), fit('power-law', 'mean', 62)], null);
    expect(far.predictions[0].time_s).toBeNull();
    expect(far.predictions[0].reason).toContain('too far beyond the frames');
    const spread = observeSeries(rows, [fit('exponential', 'mean', 25), fit('power-law', 'mean', 35)], null);
    expect(spread.predictions[0].time_s).toBeNull();
  });

  it('a crossing already seen in the frames is an observation; none is predicted past a rupture', () => {
    const seen = observeSeries(rows, [fit('exponential', 'min', 3, { observedS: 4 })], null);
    expect(seen.predictions[0]).toMatchObject({ quantity: 'min', time_s: 4, reason: 'observed: a frame is already below the threshold' });
    const rupture = { last_frame_with_film: 'f20', first_frame_without_film: 'f21', last_time_s: 20, first_time_s: 21, interval_s: 1, time_s: 20.5, rule: '' };
    const past = observeSeries(rows, [fit('exponential', 'mean', null, { beyondRupture: true })], rupture);
    expect(past.predictions[0].reason).toBe('the film ruptured before the laws reach the threshold');
  });
});
