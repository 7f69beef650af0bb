/**
 * `fitLeastSquares` for problems that give their own Jacobian (`problem.jacobian`): the same
 * method and the same result, without loading the wrapped library (which takes finite differences
 * only, so such a problem never calls it). A problem without a Jacobian is refused (TypeError).
 */
import { solveLeastSquares } from './solveLeastSquares.js';
import type { LeastSquaresProblem, LeastSquaresResult } from './types.js';

export function fitLeastSquaresWithJacobian(problem: LeastSquaresProblem): LeastSquaresResult {
  return solveLeastSquares(problem, null);
}
