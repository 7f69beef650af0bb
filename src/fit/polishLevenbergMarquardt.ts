/**
 * Our own small Levenberg–Marquardt loop, used to finish what the wrapped library started.
 * Step: (JᵀJ + μ·diag(JᵀJ)) δ = Jᵀr, accepted only if the sum of squares falls; μ is divided by
 * 10 on success and multiplied by 10 on failure (Marquardt 1963, "An algorithm for least-squares
 * estimation of nonlinear parameters", J. SIAM 11(2), 431–441, with his diagonal scaling).
 * Why: the library stops only on an absolute error threshold and damps with μ·I; this loop adds a
 * relative stopping test and scale-free damping, which the harder NIST StRD problems need.
 * Convergence: relative fall of the sum of squares ≤ tolerance on three accepted steps in a row, or no
 * step can lower it any more (μ at its ceiling): a minimum to working precision.
 */
import { choleskySolve, gradientVector, normalMatrix } from './normalEquations.js';
import type { ScaledResiduals } from './scaledResiduals.js';

export interface PolishResult {
  q: number[];
  rss: number;
  iterations: number;
  converged: boolean;
}

export function polishLevenbergMarquardt(model: ScaledResiduals, start: readonly number[], maxIterations: number, tolerance: number): PolishResult {
  const { n, p, lowerQ, upperQ } = model;
  const residuals = new Float64Array(n);
  const trial = new Float64Array(n);
  const jacobian = new Float64Array(n * p);
  const a = new Float64Array(p * p);
  const damped = new Float64Array(p * p);
  const g = new Float64Array(p);
  const delta = new Float64Array(p);
  let q = start.slice();
  let rss = model.residuals(q, residuals);
  if (!Number.isFinite(rss)) return { q, rss, iterations: 0, converged: false };
  let mu = 1e-3;
  let smallSteps = 0;
  for (let iteration = 1; iteration <= maxIterations; iteration++) {
    if (rss === 0) return { q, rss, iterations: iteration - 1, converged: true };
    model.jacobian(q, jacobian);
    normalMatrix(jacobian, n, p, a);
    gradientVector(jacobian, residuals, n, p, g);
    let accepted = false;
    while (mu <= 1e16) {
      damped.set(a);
      for (let k = 0; k < p; k++) damped[k * p + k] += mu * Math.max(a[k * p + k], 1e-300);
      if (choleskySolve(damped, g, p, delta)) {
        const next = q.map((v, k) => Math.min(Math.max(v + delta[k], lowerQ[k]), upperQ[k]));
        const nextRss = model.residuals(next, trial);
        if (Number.isFinite(nextRss) && nextRss < rss) {
          const fall = (rss - nextRss) / rss;
          q = next;
          rss = nextRss;
          residuals.set(trial);
          mu = Math.max(mu / 10, 1e-15);
          accepted = true;
          smallSteps = fall <= tolerance ? smallSteps + 1 : 0;
          break;
        }
      }
      mu *= 10;
    }
    if (!accepted) return { q, rss, iterations: iteration, converged: true };
    if (smallSteps >= 3) return { q, rss, iterations: iteration, converged: true };
  }
  return { q, rss, iterations: maxIterations, converged: false };
}
