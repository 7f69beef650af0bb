/**
 * Draws from a multivariate normal N(mean, covariance) with a seeded generator, so the intervals
 * a series reports are reproducible byte for byte. Uniforms: mulberry32 (a 32-bit generator by
 * T. Ettinger, public domain; common practice for small seeded JS generators); normals: the
 * Box–Muller transform (Box & Muller 1958, Ann. Math. Statist. 29, 610–611); correlation: the
 * Cholesky factor L of the covariance, x = mean + L·z (Golub & Van Loan, Matrix Computations,
 * 4th ed. 2013, §4.2). A covariance that is not positive definite gets a small diagonal jitter.
 */
import { createUniform } from '../../colour/seededNormal.js';

/** The project's seeded uniform generator (mulberry32, ../../colour/seededNormal.ts). */
export const mulberry32: (seed: number) => () => number = createUniform;

/** Lower-triangular L with L·Lᵀ = matrix, or null if the matrix is not positive definite. */
export function cholesky(matrix: readonly (readonly number[])[]): number[][] | null {
  const n = matrix.length;
  const l = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let sum = matrix[i][j];
      for (let k = 0; k < j; k++) sum -= l[i][k] * l[j][k];
      if (i === j) {
        if (!(sum > 0)) return null;
        l[i][i] = Math.sqrt(sum);
      } else {
        l[i][j] = sum / l[j][j];
      }
    }
  }
  return l;
}

export function sampleNormal(mean: readonly number[], covariance: readonly (readonly number[])[], count: number, seed = 1): number[][] {
  const n = mean.length;
  let l = cholesky(covariance);
  for (let jitter = 1e-12; l === null && jitter < 1; jitter *= 100) {
    l = cholesky(covariance.map((row, i) => row.map((v, j) => (i === j ? v + jitter * Math.max(Math.abs(v), 1e-300) + jitter : v))));
  }
  if (l === null) throw new RangeError('covariance must be positive semi-definite');
  const uniform = mulberry32(seed);
  const samples: number[][] = [];
  const z = new Array<number>(n);
  for (let s = 0; s < count; s++) {
    for (let i = 0; i < n; i++) {
      const u1 = Math.max(uniform(), 1e-300);
      z[i] = Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * uniform());
    }
    const x = mean.slice();
    for (let i = 0; i < n; i++) for (let k = 0; k <= i; k++) x[i] += l[i][k] * z[k];
    samples.push(x);
  }
  return samples;
}
