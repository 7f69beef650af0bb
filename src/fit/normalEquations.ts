/** Normal-equation pieces JᵀJ and Jᵀr for an n×p row-major Jacobian. */

export function normalMatrix(jacobian: Float64Array, n: number, p: number, out: Float64Array): void {
  out.fill(0);
  for (let i = 0; i < n; i++) {
    const row = i * p;
    for (let k = 0; k < p; k++) {
      const jk = jacobian[row + k];
      if (jk === 0) continue;
      for (let l = k; l < p; l++) out[k * p + l] += jk * jacobian[row + l];
    }
  }
  for (let k = 0; k < p; k++) for (let l = 0; l < k; l++) out[k * p + l] = out[l * p + k];
}

export function gradientVector(jacobian: Float64Array, residuals: Float64Array, n: number, p: number, out: Float64Array): void {
  out.fill(0);
  for (let i = 0; i < n; i++) {
    const r = residuals[i];
    for (let k = 0; k < p; k++) out[k] += jacobian[i * p + k] * r;
  }
}

/** Solves A·x = b for symmetric positive-definite A by Cholesky; returns false if A is not SPD. */
export function choleskySolve(a: Float64Array, b: Float64Array, p: number, x: Float64Array): boolean {
  const l = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = a[i * p + j];
      for (let k = 0; k < j; k++) sum -= l[i * p + k] * l[j * p + k];
      if (i === j) {
        if (!(sum > 0)) return false;
        l[i * p + i] = Math.sqrt(sum);
      } else {
        l[i * p + j] = sum / l[j * p + j];
      }
    }
  }
  for (let i = 0; i < p; i++) {
    let sum = b[i];
    for (let k = 0; k < i; k++) sum -= l[i * p + k] * x[k];
    x[i] = sum / l[i * p + i];
  }
  for (let i = p - 1; i >= 0; i--) {
    let sum = x[i];
    for (let k = i + 1; k < p; k++) sum -= l[k * p + i] * x[k];
    x[i] = sum / l[i * p + i];
  }
  return true;
}
