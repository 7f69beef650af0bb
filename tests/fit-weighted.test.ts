/**
 * fitLeastSquares(): weights, bounds, scaling, degenerate problems and argument checks.
 * Known answers come from closed forms, not from the fitter itself.
 */
import { describe, expect, it } from 'vitest';
import { fitLeastSquares } from '../src/fit/index.js';
import { createUniform } from '../src/colour/seededNormal.js';

/** Standard normal deviate by Box–Muller (Box & Muller 1958, Ann. Math. Stat. 29, 610). */
function gaussian(random: () => number): number {
  return Math.sqrt(-2 * Math.log(1 - random())) * Math.cos(2 * Math.PI * random());
}

const line = (b: readonly number[]) => (x: number) => b[0] + b[1] * x;

describe('fitLeastSquares() weighted straight line equals the closed-form weighted least-squares solution', () => {
  // Closed form: Bevington & Robinson, Data Reduction and Error Analysis for the Physical
  // Sciences, 3rd ed. 2003, section 6.3 (eqs. 6.12, 6.21): with S = Σw, Sx = Σwx, Sy = Σwy,
  // Sxx = Σwx², Sxy = Σwxy, Δ = S·Sxx − Sx²: a = (Sxx·Sy − Sx·Sxy)/Δ, b = (S·Sxy − Sx·Sy)/Δ,
  // and (JᵀWJ)⁻¹ has diagonal Sxx/Δ, S/Δ. Our covariance is s²·(JᵀWJ)⁻¹, s² = χ²/(n−2).
  const x = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9];
  const sigma = [0.5, 0.5, 1, 1, 2, 2, 0.3, 0.3, 1.5, 1.5];
  const noise = [0.3, -0.4, 0.9, -1.2, 2.5, -1.1, 0.1, -0.2, 1.0, -0.6];
  const y = x.map((v, i) => 2 + 0.7 * v + noise[i]);
  const w = sigma.map((s) => 1 / (s * s));
  const sum = (f: (i: number) => number) => x.reduce((acc, _, i) => acc + f(i), 0);
  const S = sum((i) => w[i]);
  const Sx = sum((i) => w[i] * x[i]);
  const Sy = sum((i) => w[i] * y[i]);
  const Sxx = sum((i) => w[i] * x[i] * x[i]);
  const Sxy = sum((i) => w[i] * x[i] * y[i]);
  const delta = S * Sxx - Sx * Sx;
  const a = (Sxx * Sy - Sx * Sxy) / delta;
  const b = (S * Sxy - Sx * Sy) / delta;
  const chi2 = sum((i) => w[i] * (y[i] - a - b * x[i]) ** 2);
  const s2 = chi2 / (x.length - 2);

  it('parameters, χ², standard errors and covariance match to 1e-9 relative', () => {
    const fit = fitLeastSquares({ x, y, weights: w, model: line, initial: [0, 1] });
    expect(fit.converged).toBe(true);
    expect(fit.parameters[0]).toBeCloseTo(a, 9);
    expect(fit.parameters[1]).toBeCloseTo(b, 9);
    expect(Math.abs(fit.residualSumOfSquares - chi2) / chi2).toBeLessThan(1e-9);
    expect(Math.abs(fit.standardErrors[0] - Math.sqrt((s2 * Sxx) / delta)) / Math.sqrt((s2 * Sxx) / delta)).toBeLessThan(1e-7);
    expect(Math.abs(fit.standardErrors[1] - Math.sqrt((s2 * S) / delta)) / Math.sqrt((s2 * S) / delta)).toBeLessThan(1e-7);
    const covAB = (-s2 * Sx) / delta;
    expect(Math.abs(fit.covariance[0][1] - covAB) / Math.abs(covAB)).toBeLessThan(1e-7);
    expect(fit.covariance[0][1]).toBe(fit.covariance[1][0]);
  });

  it('the weighted answer differs from the unweighted one (weights are really used)', () => {
    const weighted = fitLeastSquares({ x, y, weights: w, model: line, initial: [0, 1] });
    const plain = fitLeastSquares({ x, y, model: line, initial: [0, 1] });
    expect(Math.abs(weighted.parameters[1] - plain.parameters[1])).toBeGreaterThan(1e-3);
  });

  it('multiplying all weights by a constant leaves parameters and standard errors unchanged (s² absorbs it)', () => {
    const one = fitLeastSquares({ x, y, weights: w, model: line, initial: [0, 1] });
    const many = fitLeastSquares({ x, y, weights: w.map((v) => v * 1e4), model: line, initial: [0, 1] });
    for (let k = 0; k < 2; k++) {
      expect(many.parameters[k]).toBeCloseTo(one.parameters[k], 9);
      expect(Math.abs(many.standardErrors[k] / one.standardErrors[k] - 1)).toBeLessThan(1e-7);
    }
    expect(many.residualSumOfSquares / one.residualSumOfSquares).toBeCloseTo(1e4, 4);
  });

  it('a zero weight removes an observation', () => {
    const yOutlier = y.slice();
    yOutlier[4] += 1000;
    const wOut = w.slice();
    wOut[4] = 0;
    const keep = x.map((_, i) => i).filter((i) => i !== 4);
    const dropped = fitLeastSquares({ x: keep.map((i) => x[i]), y: keep.map((i) => y[i]), weights: keep.map((i) => w[i]), model: line, initial: [0, 1] });
    const zeroed = fitLeastSquares({ x, y: yOutlier, weights: wOut, model: line, initial: [0, 1] });
    expect(zeroed.parameters[0]).toBeCloseTo(dropped.parameters[0], 8);
    expect(zeroed.parameters[1]).toBeCloseTo(dropped.parameters[1], 8);
  });
});

describe('fitLeastSquares() weighted nonlinear round trip (data generated here from known parameters)', () => {
  // Scenario of our own: y = A·exp(−x/τ) + C with noise whose σ grows with x; 400 points.
  const truth = [50, 3.5, 2];
  const model = (b: readonly number[]) => (x: number) => b[0] * Math.exp(-x / b[1]) + b[2];
  // The project's seeded uniform stream (mulberry32, common practice for seeded test data).
  const random = createUniform(20240611);
  const x = Array.from({ length: 400 }, (_, i) => (i * 15) / 399);
  const sigma = x.map((v) => 0.05 + 0.1 * v);
  const y = x.map((v, i) => model(truth)(v) + sigma[i] * gaussian(random));
  const weights = sigma.map((s) => 1 / (s * s));

  it('recovers the truth within 4 standard errors, and χ²/dof is near 1', () => {
    const fit = fitLeastSquares({ x, y, weights, model, initial: [10, 1, 0] });
    expect(fit.converged).toBe(true);
    truth.forEach((value, k) => {
      expect(Math.abs(fit.parameters[k] - value)).toBeLessThan(4 * fit.standardErrors[k]);
      expect(fit.standardErrors[k]).toBeGreaterThan(0);
    });
    // χ²/dof for correctly weighted Gaussian noise: mean 1, sd √(2/dof) ≈ 0.071 here.
    expect(fit.residualSumOfSquares / fit.degreesOfFreedom).toBeGreaterThan(0.7);
    expect(fit.residualSumOfSquares / fit.degreesOfFreedom).toBeLessThan(1.3);
  });

  it('parameter scales of very different size do not matter (scale option vs default)', () => {
    const a = fitLeastSquares({ x, y, weights, model, initial: [10, 1, 0] });
    const b = fitLeastSquares({ x, y, weights, model, initial: [10, 1, 0], scale: [100, 1, 1] });
    for (let k = 0; k < 3; k++) expect(b.parameters[k]).toBeCloseTo(a.parameters[k], 6);
  });
});

describe('fitLeastSquares() vector residuals use x as the observation index', () => {
  it('fits three channel gains to RGB triples (demo scenario of our own), exactly', () => {
    const base = [0.1, 0.4, 0.8, 0.3, 0.6, 0.2];
    const gains = [1.2, 0.9, 1.05];
    const y = base.flatMap((v) => gains.map((g) => g * v));
    const x = y.map((_, i) => i);
    const fit = fitLeastSquares({ x, y, model: (p) => (i) => p[i % 3] * base[Math.floor(i / 3)], initial: [1, 1, 1] });
    gains.forEach((g, k) => expect(fit.parameters[k]).toBeCloseTo(g, 10));
    expect(fit.residualSumOfSquares).toBeLessThan(1e-20);
  });
});

describe('fitLeastSquares() degenerate problems and bounds', () => {
  it('reports a singular JᵀWJ as a warning with NaN standard errors (only the product a·b is determined)', () => {
    const x = [1, 2, 3, 4, 5];
    const y = [2.1, 3.9, 6.2, 7.8, 10.1];
    const fit = fitLeastSquares({ x, y, model: (p) => (v) => p[0] * p[1] * v, initial: [1, 1] });
    expect(fit.parameters[0] * fit.parameters[1]).toBeCloseTo(2.0, 1);
    expect(fit.standardErrors.every(Number.isNaN)).toBe(true);
    expect(fit.warnings.join(' ')).toMatch(/singular or ill-conditioned/);
  });

  it('reports a parameter without influence as a warning with NaN standard errors', () => {
    const idle = fitLeastSquares({ x: [1, 2, 3], y: [1, 2, 3.1], model: (p) => (v) => p[0] * v + 0 * p[1], initial: [1, 5] });
    expect(idle.standardErrors.every(Number.isNaN)).toBe(true);
    expect(idle.warnings.join(' ')).toMatch(/no influence/);
  });

  it('keeps parameters within bounds and says when one ends on a bound', () => {
    const x = [0, 1, 2, 3, 4, 5];
    const y = x.map((v) => 1 + 2 * v);
    const fit = fitLeastSquares({ x, y, model: line, initial: [0, 1], upper: [10, 1.5] });
    expect(fit.parameters[1]).toBeLessThanOrEqual(1.5);
    expect(fit.parameters[1]).toBeCloseTo(1.5, 12);
    expect(fit.warnings.join(' ')).toMatch(/parameter 1 ended at its upper bound/);
  });

  it('says so when the iteration budget runs out (converged false plus a warning)', () => {
    const x = Array.from({ length: 30 }, (_, i) => i / 3);
    const y = x.map((v) => 5 * Math.exp(-v / 2) + 1);
    const fit = fitLeastSquares({ x, y, model: (b) => (v) => b[0] * Math.exp(-v / b[1]) + b[2], initial: [1, 20, 0], maxIterations: 1 });
    expect(fit.converged).toBe(false);
    expect(fit.warnings.join(' ')).toMatch(/did not converge within 1 iterations/);
  });

  it('reaches an exact fit with zero residual', () => {
    const x = [0, 1, 2, 3];
    const fit = fitLeastSquares({ x, y: x.map((v) => 3 - v), model: line, initial: [1, 1] });
    expect(fit.parameters[0]).toBeCloseTo(3, 10);
    expect(fit.parameters[1]).toBeCloseTo(-1, 10);
    expect(fit.converged).toBe(true);
  });
});

describe('fitLeastSquares() argument checks name the parameter', () => {
  const base = { x: [1, 2, 3], y: [1, 2, 3], model: line, initial: [0, 1] };
  it('needs more observations than parameters', () => {
    expect(() => fitLeastSquares({ ...base, x: [1, 2], y: [1, 2] })).toThrow(/more observations than parameters: 2 observations for 2 parameters/);
  });
  it('refuses mismatched lengths, non-finite data, negative weights, bad bounds and bad options', () => {
    expect(() => fitLeastSquares({ ...base, y: [1, 2] })).toThrow(RangeError);
    expect(() => fitLeastSquares({ ...base, y: [1, NaN, 3] })).toThrow(/y\[1\] must be a finite number, received NaN/);
    expect(() => fitLeastSquares({ ...base, weights: [1, -1, 1] })).toThrow(/weights\[1\] must be >= 0/);
    expect(() => fitLeastSquares({ ...base, lower: [1, 0] })).toThrow(/initial\[0\] must lie within/);
    expect(() => fitLeastSquares({ ...base, scale: [0, 1] })).toThrow(/scale\[0\] must be > 0/);
    expect(() => fitLeastSquares({ ...base, maxIterations: 0 })).toThrow(/maxIterations/);
    expect(() => fitLeastSquares({ ...base, model: 3 as never })).toThrow(TypeError);
  });
  it('refuses a model that is not finite at the initial parameters', () => {
    expect(() => fitLeastSquares({ ...base, model: () => () => NaN })).toThrow(/finite values at the initial parameters/);
  });
});
