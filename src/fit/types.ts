/** Problem and result records of the least-squares fitting layer (see ./fitLeastSquares.ts). */

export interface LeastSquaresProblem {
  /** Independent variable per observation (for vector residuals: the observation index). */
  x: ArrayLike<number>;
  /** Observed value per observation. */
  y: ArrayLike<number>;
  /** Weight per observation, w = 1/σ² (default 1 for every observation). */
  weights?: ArrayLike<number>;
  /** Model: binds parameters once, returns the prediction for one x. */
  model: (params: readonly number[]) => (x: number) => number;
  /**
   * Optional: the model's prediction for every observation at once, in the order of `x` (the
   * same numbers as `model(params)(x[i])`). When given, the solver's own loop evaluates through it
   * (no function call per observation).
   */
  modelVector?: (params: readonly number[]) => ArrayLike<number>;
  initial: readonly number[];
  lower?: readonly number[];
  upper?: readonly number[];
  /** Typical magnitude per parameter; the solver works on p / scale (default |initial|, or 1 where 0). */
  scale?: readonly number[];
  /** Upper bound on solver iterations (default 200). */
  maxIterations?: number;
  /** Relative change of the residual sum of squares that counts as converged (default 1e-12). */
  tolerance?: number;
  /**
   * Also polish from the initial point and keep the better result (default true): guards against
   * the library wandering to a worse minimum from a poor start. A caller whose start is already
   * good (e.g. from a scan) and who fits many times may turn it off to halve the work.
   */
  restartFromInitial?: boolean;
  /** Names of the parameters in words, for warnings (default "parameter k"). */
  parameterNames?: readonly string[];
  /**
   * The model's derivatives, when the caller can give them: fills `out` (n × p, row-major) with
   * ∂f(xᵢ; params)/∂params_k. With it the solver uses no finite differences (each iteration costs
   * one model evaluation and one Jacobian instead of 2p + 1 evaluations) and runs its own
   * Marquardt loop only (./polishLevenbergMarquardt.ts): the wrapped library cannot take a Jacobian.
   */
  jacobian?: (params: readonly number[], out: Float64Array) => void;
}

export interface LeastSquaresResult {
  parameters: number[];
  /** √diag(covariance); NaN where the covariance could not be formed. */
  standardErrors: number[];
  /** s² (JᵀWJ)⁻¹ with s² = RSS / (n − p), J the model Jacobian at the optimum. */
  covariance: number[][];
  /** Σ wᵢ (yᵢ − f(xᵢ))². */
  residualSumOfSquares: number;
  /** n − p. */
  degreesOfFreedom: number;
  iterations: number;
  converged: boolean;
  warnings: string[];
}
