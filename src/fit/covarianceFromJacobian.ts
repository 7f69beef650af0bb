/**
 * Parameter covariance at a least-squares optimum from the Jacobian of the model:
 *   cov = s²·(JᵀWJ)⁻¹,  s² = RSS / (n − p)
 * (the usual asymptotic estimate, e.g. Bates & Watts, Nonlinear Regression Analysis and Its
 * Applications, Wiley 1988, section 2.3; it is the estimate NIST StRD certifies as the parameters'
 * standard deviations). The inverse is taken through the eigen-decomposition of the correlation-
 * scaled normal matrix, so a singular or ill-conditioned problem is reported (condition number
 * above 1e13, or a non-positive eigenvalue) and its standard errors are NaN rather than noise.
 */
import { normalMatrix } from './normalEquations.js';
import { symmetricEigen } from './symmetricEigen.js';

export const MAX_CONDITION = 1e13;

export interface CovarianceResult {
  covariance: number[][];
  standardErrors: number[];
  warning?: string;
}

/** `jacobian` is n×p row-major in the parameters themselves, rows already multiplied by √w. */
export function covarianceFromJacobian(jacobian: Float64Array, n: number, p: number, rss: number): CovarianceResult {
  const nan = (): CovarianceResult => ({
    covariance: Array.from({ length: p }, () => new Array<number>(p).fill(NaN)),
    standardErrors: new Array<number>(p).fill(NaN),
  });
  const a = new Float64Array(p * p);
  normalMatrix(jacobian, n, p, a);
  const d = new Float64Array(p);
  for (let k = 0; k < p; k++) d[k] = Math.sqrt(a[k * p + k]);
  const zero = d.findIndex((v) => !(v > 0) || !Number.isFinite(v));
  if (zero >= 0) return { ...nan(), warning: `parameter ${zero} has no influence on the model at the optimum (zero Jacobian column); standard errors not available` };
  const scaled = new Float64Array(p * p);
  for (let k = 0; k < p; k++) for (let l = 0; l < p; l++) scaled[k * p + l] = a[k * p + l] / (d[k] * d[l]);
  const { values, vectors } = symmetricEigen(scaled, p);
  let max = -Infinity;
  let min = Infinity;
  for (const v of values) {
    max = Math.max(max, v);
    min = Math.min(min, v);
  }
  if (!(min > 0) || max / min > MAX_CONDITION) {
    const condition = min > 0 ? (max / min).toExponential(2) : 'infinite';
    return { ...nan(), warning: `JᵀWJ is singular or ill-conditioned (condition number ${condition}); parameters are not separately determined and standard errors are not available` };
  }
  const s2 = rss / (n - p);
  const covariance: number[][] = [];
  for (let k = 0; k < p; k++) {
    const row: number[] = [];
    for (let l = 0; l < p; l++) {
      let sum = 0;
      for (let e = 0; e < p; e++) sum += (vectors[k * p + e] * vectors[l * p + e]) / values[e];
      row.push((s2 * sum) / (d[k] * d[l]));
    }
    covariance.push(row);
  }
  return { covariance, standardErrors: covariance.map((row, k) => Math.sqrt(row[k])) };
}
