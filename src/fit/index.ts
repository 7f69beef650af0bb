/** Fitting layer: weighted, bounded nonlinear least squares with standard errors. */
export { fitLeastSquares } from './fitLeastSquares.js';
export type { LeastSquaresProblem, LeastSquaresResult } from './types.js';
