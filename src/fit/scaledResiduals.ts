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
  const { x, y, sqrtWeights, model, scale } = problem;
  const analytic = problem.jacobian;
  const n = x.length;
  const p = scale.length;
  const lowerQ = problem.lower.map((v, k) => v / scale[k]);
  const upperQ = problem.upper.map((v, k) => v / scale[k]);
  const plus = new Float64Array(n);
  const minus = new Float64Array(n);
  const toParams = (q: readonly number[]): number[] => q.map((v, k) => v * scale[k]);

  const predict = (q: readonly number[], out: Float64Array): void => {
    const f = model(toParams(q));
    for (let i = 0; i < n; i++) out[i] = normalisation * sqrtWeights[i] * f(x[i]);
  };

  return {
    n,
    p,
    toParams,
    lowerQ,
    upperQ,
    residuals(q, out) {
      let rss = 0;
      try {
        predict(q, out);
      } catch {
        return NaN;
      }
      for (let i = 0; i < n; i++) {
        const r = normalisation * sqrtWeights[i] * y[i] - out[i];
        out[i] = r;
        rss += r * r;
      }
      return rss;
    },
    jacobian(q, jacobian) {
      if (analytic) {
        // The caller's derivatives: J_ik = c·√w_i·∂f_i/∂p_k·scale_k (p = q·scale).
        analytic(toParams(q), jacobian);
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
        predict(shifted, plus);
        shifted[k] = down;
        predict(shifted, minus);
        shifted[k] = q[k];
        const span = up - down;
        for (let i = 0; i < n; i++) jacobian[i * p + k] = span > 0 ? (plus[i] - minus[i]) / span : 0;
      }
    },
  };
}
