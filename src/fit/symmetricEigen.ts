/**
 * Eigenvalues and eigenvectors of a small symmetric matrix by the cyclic Jacobi method
 * (Golub & Van Loan, Matrix Computations, 4th ed. 2013, section 8.5). Used on p×p normal
 * matrices (p ≲ 20), where it is accurate to rounding and simple to verify.
 */

export interface SymmetricEigen {
  /** Eigenvalues, unsorted. */
  values: Float64Array;
  /** Eigenvectors as columns of a p×p row-major matrix. */
  vectors: Float64Array;
}

export function symmetricEigen(matrix: Float64Array, p: number): SymmetricEigen {
  const a = Float64Array.from(matrix);
  const v = new Float64Array(p * p);
  for (let i = 0; i < p; i++) v[i * p + i] = 1;
  for (let sweep = 0; sweep < 100; sweep++) {
    let off = 0;
    let diag = 0;
    for (let i = 0; i < p; i++) {
      diag += a[i * p + i] * a[i * p + i];
      for (let j = i + 1; j < p; j++) off += a[i * p + j] * a[i * p + j];
    }
    if (off <= 1e-32 * diag || off === 0) break;
    for (let i = 0; i < p; i++) {
      for (let j = i + 1; j < p; j++) {
        const aij = a[i * p + j];
        if (aij === 0) continue;
        const theta = (a[j * p + j] - a[i * p + i]) / (2 * aij);
        const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
        const c = 1 / Math.sqrt(t * t + 1);
        const s = t * c;
        for (let k = 0; k < p; k++) {
          const aki = a[k * p + i];
          const akj = a[k * p + j];
          a[k * p + i] = c * aki - s * akj;
          a[k * p + j] = s * aki + c * akj;
        }
        for (let k = 0; k < p; k++) {
          const aik = a[i * p + k];
          const ajk = a[j * p + k];
          a[i * p + k] = c * aik - s * ajk;
          a[j * p + k] = s * aik + c * ajk;
        }
        for (let k = 0; k < p; k++) {
          const vki = v[k * p + i];
          const vkj = v[k * p + j];
          v[k * p + i] = c * vki - s * vkj;
          v[k * p + j] = s * vki + c * vkj;
        }
      }
    }
  }
  const values = new Float64Array(p);
  for (let i = 0; i < p; i++) values[i] = a[i * p + i];
  return { values, vectors: v };
}
