/**
 * Weighted nonlinear least squares: minimise Σ wᵢ (yᵢ − f(xᵢ; p))² with optional bounds.
 *
 * Method (Levenberg 1944, Q. Appl. Math. 2, 164–168; Marquardt 1963, J. SIAM 11, 431–441):
 *  1. The problem is rewritten in scaled parameters q = p / scale, with residuals multiplied by √w
 *     and by one constant that makes their initial RMS 1. Weights therefore enter only through our
 *     residuals: the wrapped library's own `weights` option is left at 1, because in
 *     ml-levenberg-marquardt 5.1.0 its error sum multiplies residuals² by weights² while its step
 *     divides by weights² (src/check_options.ts, error_calculation.ts, step.ts), which is
 *     consistent only for equal weights.
 *  2. `levenbergMarquardt` from ml-levenberg-marquardt runs in blocks of 10 iterations (every option
 *     passed explicitly; central differences with a per-parameter step) until a block lowers the
 *     sum of squares by less than `tolerance` (relative). The library alone stops only on an
 *     absolute error threshold. A problem that gives its own Jacobian skips this phase (the
 *     library takes finite differences only): phase 3 then does all the work, with the model's
 *     derivatives, at one evaluation and one Jacobian per iteration.
 *  3. Our own Marquardt-scaled loop (./polishLevenbergMarquardt.ts) finishes the descent and
 *     decides convergence. The same loop is also run from the initial point (a restart), and the
 *     lower sum of squares wins: see the comment in the code for why (`restartFromInitial: false`
 *     skips the restart).
 *  4. Standard errors from the Jacobian at the optimum: cov = s²·(JᵀWJ)⁻¹, s² = RSS/(n − p)
 *     (./covarianceFromJacobian.ts). Singular or ill-conditioned JᵀWJ → warning and NaN errors.
 * For vector residuals (e.g. three colour channels per pixel) pass x = observation index and let
 * the model look up what it needs.
 */
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { solveLeastSquares } from './solveLeastSquares.js';
import type { LeastSquaresProblem, LeastSquaresResult } from './types.js';

export function fitLeastSquares(problem: LeastSquaresProblem): LeastSquaresResult {
  return solveLeastSquares(problem, levenbergMarquardt);
}
