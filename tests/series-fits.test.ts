/**
 * Drainage fits. Round trips: curves generated from known parameters with our own models, plus
 * seeded Gaussian noise, fitted back (tolerances stated per test). Closed forms: Reynolds
 * thinning linearises exactly as 1/h² = 1/h0² + t/(t0·h0²) (Reynolds 1886; Scheludko 1967), and
 * the exponential law is linear in (h0, h∞) once τ is fixed, so the least-squares optimum must
 * satisfy the 2×2 normal equations there (Björck 1996, Numerical Methods for Least Squares
 * Problems, §1.1). The crossing time of the exponential law is τ·ln((h0 − h∞)/(T − h∞)).
 */
import { describe, expect, it } from 'vitest';
import { exponentialModel, powerLawModel, reynoldsModel, type DrainageModel } from '../src/series/fits/drainageModels.js';
import { fitDrainage } from '../src/series/fits/fitDrainage.js';
import { fitSeriesDrainage } from '../src/series/fits/fitSeriesDrainage.js';
import { cholesky, mulberry32, sampleNormal } from '../src/series/fits/sampleNormal.js';
import type { SeriesRow } from '../src/series/seriesRows.js';

function gaussian(seed: number): () => number {
  const u = mulberry32(seed);
  return () => Math.sqrt(-2 * Math.log(Math.max(u(), 1e-300))) * Math.cos(2 * Math.PI * u());
}

function curve(model: DrainageModel, p: number[], tS: number[], sigmaNm: number, seed = 7): number[] {
  const f = model.model(p);
  const noise = gaussian(seed);
  return tS.map((t) => f(t) + sigmaNm * noise());
}

const times = (count: number, stepS: number) => Array.from({ length: count }, (_, i) => i * stepS);

describe('fitDrainage() round trips (own forward model, seeded noise σ = 5 nm, 61 frames at 2 fps)', () => {
  const tS = times(61, 0.5);
  const cases: Array<{ model: DrainageModel; truth: number[] }> = [
    { model: exponentialModel, truth: [1200, 150, 8] },
    { model: powerLawModel, truth: [1500, 3, 0.7] },
    { model: reynoldsModel, truth: [1100, 2.5] },
  ];
  it.each(cases)('$model.name recovers its parameters within 4 standard uncertainties and 5 %', ({ model, truth }) => {
    const fit = fitDrainage(tS, curve(model, truth, tS, 5), model, { quantity: 'mean', thinBelowNm: null });
    expect(fit.converged).toBe(true);
    model.parameterNames.forEach((name, i) => {
      const { value, uncertainty } = fit.parameters[name];
      expect(uncertainty).not.toBeNull();
      expect(Math.abs(value - truth[i])).toBeLessThan(4 * uncertainty!);
      expect(Math.abs(value - truth[i]) / truth[i]).toBeLessThan(0.05);
    });
    expect(fit.rmsNm).toBeGreaterThan(3.5);
    expect(fit.rmsNm).toBeLessThan(6.5);
    expect(fit.rSquared!).toBeGreaterThan(0.99);
  });
});

describe('fitDrainage() against closed forms', () => {
  it('reynolds: noise-free data give the h0, t0 of the exact linearisation 1/h² = 1/h0² + t/(t0·h0²)', () => {
    const tS = times(20, 1);
    const hNm = tS.map((t) => 900 / Math.sqrt(1 + t / 4));
    // closed form by linear regression of 1/h² on t
    const yInv = hNm.map((h) => 1 / (h * h));
    const n = tS.length;
    const mt = tS.reduce((s, v) => s + v, 0) / n;
    const my = yInv.reduce((s, v) => s + v, 0) / n;
    const slope = tS.reduce((s, t, i) => s + (t - mt) * (yInv[i] - my), 0) / tS.reduce((s, t) => s + (t - mt) ** 2, 0);
    const intercept = my - slope * mt;
    const h0 = 1 / Math.sqrt(intercept);
    const t0 = 1 / (slope * h0 * h0);
    const fit = fitDrainage(tS, hNm, reynoldsModel, { quantity: 'mean', thinBelowNm: null });
    expect(fit.parameters.h0Nm.value).toBeCloseTo(h0, 4);
    expect(fit.parameters.t0S.value).toBeCloseTo(t0, 5);
    expect(fit.rSquared).toBeCloseTo(1, 10);
  });

  it('exponential: at the fitted τ, (h0, h∞) solve the linear normal equations (noisy data)', () => {
    const tS = times(40, 0.5);
    const hNm = curve(exponentialModel, [1000, 200, 6], tS, 10, 11);
    const fit = fitDrainage(tS, hNm, exponentialModel, { quantity: 'mean', thinBelowNm: null });
    const tau = fit.parameters.tauS.value;
    // h = h0·e + h∞·(1 − e), e = exp(−t/τ): columns a = e, b = 1 − e
    const a = tS.map((t) => Math.exp(-t / tau));
    const b = a.map((e) => 1 - e);
    const dot = (u: number[], v: number[]) => u.reduce((s, x, i) => s + x * v[i], 0);
    const [aa, ab, bb, ay, by] = [dot(a, a), dot(a, b), dot(b, b), dot(a, hNm), dot(b, hNm)];
    const det = aa * bb - ab * ab;
    expect(fit.parameters.h0Nm.value).toBeCloseTo((ay * bb - ab * by) / det, 3);
    expect(fit.parameters.hInfNm.value).toBeCloseTo((aa * by - ab * ay) / det, 3);
  });
});

describe('fitDrainage() threshold crossing', () => {
  it('equals τ·ln((h0 − h∞)/(T − h∞)) on exact data, with an interval around it, inside the data', () => {
    const tS = times(41, 0.5);
    const hNm = curve(exponentialModel, [1200, 150, 8], tS, 5, 3);
    const fit = fitDrainage(tS, hNm, exponentialModel, { quantity: 'mean', thinBelowNm: 400 });
    const { h0Nm, hInfNm, tauS } = fit.parameters;
    const expected = tauS.value * Math.log((h0Nm.value - hInfNm.value) / (400 - hInfNm.value));
    const c = fit.crossing!;
    expect(c.timeS).toBeCloseTo(expected, 9);
    expect(c.lowS!).toBeLessThan(c.timeS!);
    expect(c.highS!).toBeGreaterThan(c.timeS!);
    expect(c.extrapolated).toBe(false);
    expect(c.observedS).toBeGreaterThan(c.timeS! - 1.5);
    expect(Math.abs(c.timeS! - 8 * Math.log(1050 / 250))).toBeLessThan(2 * (c.highS! - c.lowS!));
  });

  it('flags a crossing after the last frame as extrapolated', () => {
    const tS = times(11, 0.5);
    const fit = fitDrainage(tS, curve(exponentialModel, [1200, 150, 8], tS, 2, 5), exponentialModel, { quantity: 'mean', thinBelowNm: 400 });
    expect(fit.crossing!.timeS!).toBeGreaterThan(5);
    expect(fit.crossing!.extrapolated).toBe(true);
    expect(fit.crossing!.observedS).toBeNull();
  });

  it('returns no crossing time when the fitted curve levels off above the threshold', () => {
    const tS = times(30, 0.5);
    const fit = fitDrainage(tS, curve(exponentialModel, [1200, 600, 3], tS, 0, 1), exponentialModel, { quantity: 'mean', thinBelowNm: 400 });
    expect(fit.crossing!.timeS).toBeNull();
    expect(fit.crossing!.extrapolated).toBe(true);
    expect(fit.crossing!.belowAtStart).toBe(false);
  });

  it('says when the curve is already below the threshold at the first frame', () => {
    const tS = times(20, 0.5);
    const fit = fitDrainage(tS, curve(exponentialModel, [90, 20, 3], tS, 0, 1), exponentialModel, { quantity: 'min', thinBelowNm: 100 });
    expect(fit.crossing!.belowAtStart).toBe(true);
    expect(fit.crossing!.extrapolated).toBe(false);
    expect(fit.crossing!.observedS).toBe(0);
  });

  it('the ±1σ interval covers the true crossing time in roughly 68 % of noisy replicates (40 seeds)', () => {
    const tS = times(41, 0.5);
    const truth = 8 * Math.log(1050 / 250);
    let covered = 0;
    for (let seed = 1; seed <= 40; seed++) {
      const fit = fitDrainage(tS, curve(exponentialModel, [1200, 150, 8], tS, 20, seed * 101), exponentialModel, { quantity: 'mean', thinBelowNm: 400, samples: 500 });
      if (fit.crossing!.lowS! <= truth && truth <= fit.crossing!.highS!) covered++;
    }
    expect(covered / 40).toBeGreaterThan(0.45);
    expect(covered / 40).toBeLessThan(0.9);
  });

  it('needs more frames than parameters', () => {
    expect(() => fitDrainage([0, 1, 2], [3, 2, 1], exponentialModel, { quantity: 'min', thinBelowNm: null })).toThrow(
      'exponential fit needs at least 4 frames with a min thickness, received 3',
    );
  });
});

describe('fitSeriesDrainage()', () => {
  it('fits each law to mean and minimum, and reports a law it cannot fit as a warning', () => {
    const rows: SeriesRow[] = times(4, 1).map((t) => ({
      frame: `f${t}.jpg`, timeS: t, meanNm: 1000 - 50 * t, medianNm: null, minNm: t < 2 ? 500 - 50 * t : null, maxNm: null,
      stdNm: null, thinFraction: 0, thinRegions: 0, coverage: 1, exposure: null, darkLimitNm: null,
    }));
    const { fits, warnings } = fitSeriesDrainage(rows, 100);
    expect(fits.map((f) => `${f.quantity}:${f.model}`)).toEqual(['mean:exponential', 'mean:power-law', 'mean:reynolds']);
    expect(warnings.filter((w) => /min thickness skipped/.test(w))).toHaveLength(3);
  });
});

describe('sampleNormal()', () => {
  it('cholesky() factors the textbook 3×3 example (from memory: L = [[2,0,0],[6,1,0],[−8,5,3]])', () => {
    expect(cholesky([[4, 12, -16], [12, 37, -43], [-16, -43, 98]])).toEqual([[2, 0, 0], [6, 1, 0], [-8, 5, 3]]);
    expect(cholesky([[1, 2], [2, 1]])).toBeNull();
  });
  it('draws with the requested mean and covariance (20 000 draws, within 3 %)', () => {
    const cov = [[4, 1.2], [1.2, 1]];
    const draws = sampleNormal([10, -5], cov, 20000, 42);
    const mean = [0, 1].map((j) => draws.reduce((s, d) => s + d[j], 0) / draws.length);
    expect(mean[0]).toBeCloseTo(10, 1);
    expect(mean[1]).toBeCloseTo(-5, 1);
    const c01 = draws.reduce((s, d) => s + (d[0] - mean[0]) * (d[1] - mean[1]), 0) / draws.length;
    const c00 = draws.reduce((s, d) => s + (d[0] - mean[0]) ** 2, 0) / draws.length;
    expect(Math.abs(c00 - 4) / 4).toBeLessThan(0.03);
    expect(Math.abs(c01 - 1.2) / 1.2).toBeLessThan(0.06);
  });
  it('is reproducible for a seed', () => {
    expect(sampleNormal([0], [[1]], 3, 9)).toEqual(sampleNormal([0], [[1]], 3, 9));
  });
});
