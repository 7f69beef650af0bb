/**
 * The body of the weighted, bounded least-squares fit (method: ./fitLeastSquares.ts), with the
 * wrapped library's Levenberg–Marquardt passed in, so that a fit with the model's own Jacobian
 * (the photo-formation fit of every map) does not load the library: importing it costs about
 * 0.1 s in every process and worker thread (it parses ml-matrix, 150 kB of CommonJS).
 */
import type { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { checkProblem } from './checkProblem.js';
import { scaledResiduals } from './scaledResiduals.js';
import { polishLevenbergMarquardt } from './polishLevenbergMarquardt.js';
import { covarianceFromJacobian } from './covarianceFromJacobian.js';
import type { LeastSquaresProblem, LeastSquaresResult } from './types.js';

const LIBRARY_BLOCK = 10;
const STEP = Math.cbrt(Number.EPSILON);

/** The wrapped library's Levenberg–Marquardt (phase 2), or null where only problems with a Jacobian are solved. */
export type LibraryLevenbergMarquardt = typeof levenbergMarquardt;

/**
 * The method of ./fitLeastSquares.ts with the wrapped library passed in: null solves problems
 * that give their own Jacobian (which never use the library) without loading it.
 */
export function solveLeastSquares(problem: LeastSquaresProblem, library: LibraryLevenbergMarquardt | null): LeastSquaresResult {
  const checked = checkProblem(problem);
  if (checked.jacobian === null && library === null) throw new TypeError('fitLeastSquaresWithJacobian needs problem.jacobian (the model\'s derivatives); fitLeastSquares takes problems without one');
  const { x, y, sqrtWeights, scale, maxIterations, tolerance } = checked;
  const n = x.length;
  const p = scale.length;
  const warnings: string[] = [];
  const plain = scaledResiduals(checked, 1);
  const work = new Float64Array(n);
  let q = checked.initial.map((v, k) => v / scale[k]);
  const rss0 = plain.residuals(q, work);
  if (!Number.isFinite(rss0)) {
    throw new RangeError(`model must return finite values at the initial parameters [${checked.initial.join(', ')}], received a non-finite residual sum of squares`);
  }
  const c = rss0 > 0 ? 1 / Math.sqrt(rss0 / n) : 1;
  const normalised = scaledResiduals(checked, c);

  // Phase 2: the wrapped library, in blocks.
  const index = Float64Array.from({ length: n }, (_, i) => i);
  const target = Float64Array.from(y, (v, i) => c * sqrtWeights[i] * v);
  const parameterised = (qs: number[]) => {
    const f = checked.model(normalised.toParams(qs));
    return (i: number) => c * sqrtWeights[i] * f(x[i]);
  };
  let rss = normalised.residuals(q, work);
  let iterations = 0;
  // With the model's own derivatives, the library (finite differences only) is skipped.
  while (checked.jacobian === null && iterations < maxIterations && rss > 0) {
    let out;
    try {
      out = (library as LibraryLevenbergMarquardt)({ x: index, y: target }, parameterised, {
        initialValues: q,
        weights: 1,
        damping: 1e-2,
        dampingStepUp: 11,
        dampingStepDown: 9,
        improvementThreshold: 1e-3,
        gradientDifference: q.map((v) => STEP * Math.max(Math.abs(v), 1)),
        centralDifference: true,
        minValues: normalised.lowerQ,
        maxValues: normalised.upperQ,
        maxIterations: Math.min(LIBRARY_BLOCK, maxIterations - iterations),
        errorTolerance: 0,
      });
    } catch {
      break; // e.g. the model threw for a trial point: continue with our own loop
    }
    iterations += out.iterations;
    const next = normalised.residuals(out.parameterValues, work);
    if (!(Number.isFinite(next) && next < rss)) break;
    const fall = (rss - next) / rss;
    q = out.parameterValues.slice();
    rss = next;
    if (fall <= tolerance) break;
  }

  // Phase 3: our own Marquardt loop finishes and judges convergence. It is also run from the
  // initial point: the library takes every step, even one that raises the sum of squares, and
  // from NIST's first start of Rat43 and second start of MGH09 it wanders to a worse minimum.
  // The lower of the two results is kept.
  const viaLibrary = polishLevenbergMarquardt(normalised, q, maxIterations, tolerance);
  const direct = checked.restartFromInitial && checked.jacobian === null
    ? polishLevenbergMarquardt(normalised, checked.initial.map((v, k) => v / scale[k]), maxIterations, tolerance)
    : null;
  const polished = direct !== null && direct.rss < viaLibrary.rss ? direct : viaLibrary;
  q = polished.q;
  iterations += viaLibrary.iterations + (direct?.iterations ?? 0);
  if (!polished.converged) warnings.push(`did not converge within ${maxIterations} iterations; result is the best point found`);

  // Phase 4: statistics in the original parameters (no normalisation, Jacobian columns / scale).
  const finalRss = plain.residuals(q, work);
  const jacobian = new Float64Array(n * p);
  plain.jacobian(q, jacobian);
  for (let i = 0; i < n; i++) for (let k = 0; k < p; k++) jacobian[i * p + k] /= scale[k];
  const stats = covarianceFromJacobian(jacobian, n, p, finalRss);
  if (stats.warning) warnings.push(stats.warning);
  q.forEach((v, k) => {
    if (v <= normalised.lowerQ[k] || v >= normalised.upperQ[k]) {
      const name = problem.parameterNames?.[k] ?? `parameter ${k}`;
      const bound = v <= normalised.lowerQ[k] ? 'lower' : 'upper';
      const value = plain.toParams(q)[k];
      warnings.push(`${name} ended at its ${bound} bound (${Number(value.toPrecision(3))}); its standard error treats it as free`);
    }
  });
  return {
    parameters: plain.toParams(q),
    standardErrors: stats.standardErrors,
    covariance: stats.covariance,
    residualSumOfSquares: finalRss,
    degreesOfFreedom: n - p,
    iterations,
    converged: polished.converged,
    warnings,
  };
}
