/**
 * Weighted residuals and their Jacobian in scaled parameters q = p / scale.
 *   rᵢ(q) = c·√wᵢ·(yᵢ − f(xᵢ; q·scale)),   Jᵢₖ = ∂(c·√wᵢ·f(xᵢ))/∂qₖ = −∂rᵢ/∂qₖ
 * c is a constant residual normalisation (it does not move the minimum; it keeps the solver's
 * additive damping meaningful whatever the units of y). The Jacobian uses central differences
 * with step h = ε^(1/3)·max(|qₖ|, 1), which balances truncation (O(h²)) against rounding
 * (O(ε/h)) — Nocedal & Wright, Numerical Optimization, 2nd ed. 2006, section 8.1.
 * Near a bound the difference becomes one-sided so the model is never evaluated outside it.
 * When the problem gives its own derivatives (`jacobian`), those are used instead.
 */
import type { CheckedProblem } from './checkProblem.js';

export interface ScaledResiduals {
  n: number;
  p: number;
  /** Parameters p = q·scale. */
  toParams(q: readonly number[]): number[];
  /** Fills `out` with residuals at q and returns their sum of squares (NaN if the model fails). */
  residuals(q: readonly number[], out: Float64Array): number;
  /** Fills `jacobian` (n×p, row-major) at q. */
  jacobian(q: readonly number[], jacobian: Float64Array): void;
  /** Lower and upper bounds in q. */
  lowerQ: number[];
  upperQ: number[];
}

const STEP = Math.cbrt(Number.EPSILON);

export function scaledResiduals(problem: CheckedProblem, normalisation = 1): ScaledResiduals {
  return new ScaledResidualsOf(problem, normalisation);
}

/**
 * ScaledResiduals of one problem. A class, so that its code is compiled once per process: as an
 * object of closures made per fit, V8 optimised them anew for every fit (several per frame).
 */
class ScaledResidualsOf implements ScaledResiduals {
  readonly n: number;
  readonly p: number;
  readonly lowerQ: number[];
  readonly upperQ: number[];
  private readonly problem: CheckedProblem;
  private readonly normalisation: number;
  private readonly plus: Float64Array;
  private readonly minus: Float64Array;

  constructor(problem: CheckedProblem, normalisation: number) {
    const { x, scale } = problem;
    this.problem = problem;
    this.normalisation = normalisation;
    this.n = x.length;
    this.p = scale.length;
    this.lowerQ = problem.lower.map((v, k) => v / scale[k]);
    this.upperQ = problem.upper.map((v, k) => v / scale[k]);
    this.plus = new Float64Array(this.n);
    this.minus = new Float64Array(this.n);
  }

  toParams(q: readonly number[]): number[] {
    const scale = this.problem.scale;
    return q.map((v, k) => v * scale[k]);
  }

  private predict(q: readonly number[], out: Float64Array): void {
    const { x, sqrtWeights, model, modelVector } = this.problem;
    const { n, normalisation } = this;
    if (modelVector) {
      const values = modelVector(this.toParams(q));
      for (let i = 0; i < n; i++) out[i] = normalisation * sqrtWeights[i] * values[i];
      return;
    }
    const f = model(this.toParams(q));
    for (let i = 0; i < n; i++) out[i] = normalisation * sqrtWeights[i] * f(x[i]);
  }

  residuals(q: readonly number[], out: Float64Array): number {
    const { y, sqrtWeights } = this.problem;
    const { n, normalisation } = this;
    let rss = 0;
    try {
      this.predict(q, out);
    } catch {
      return NaN;
    }
    for (let i = 0; i < n; i++) {
      const r = normalisation * sqrtWeights[i] * y[i] - out[i];
      out[i] = r;
      rss += r * r;
    }
    return rss;
  }

  jacobian(q: readonly number[], jacobian: Float64Array): void {
    const { sqrtWeights, scale } = this.problem;
    const analytic = this.problem.jacobian;
    const { n, p, normalisation, plus, minus, lowerQ, upperQ } = this;
    if (analytic) {
      // The caller's derivatives: J_ik = c·√w_i·∂f_i/∂p_k·scale_k (p = q·scale).
      analytic(this.toParams(q), jacobian);
      for (let i = 0; i < n; i++) {
        const row = normalisation * sqrtWeights[i];
        for (let k = 0; k < p; k++) jacobian[i * p + k] *= row * scale[k];
      }
      return;
    }
    const shifted = q.slice();
    for (let k = 0; k < p; k++) {
      const h = STEP * Math.max(Math.abs(q[k]), 1);
      const up = Math.min(q[k] + h, upperQ[k]);
      const down = Math.max(q[k] - h, lowerQ[k]);
      shifted[k] = up;
      this.predict(shifted, plus);
      shifted[k] = down;
      this.predict(shifted, minus);
      shifted[k] = q[k];
      const span = up - down;
      for (let i = 0; i < n; i++) jacobian[i * p + k] = span > 0 ? (plus[i] - minus[i]) / span : 0;
    }
  }
}
