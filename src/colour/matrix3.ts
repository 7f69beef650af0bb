/**
 * 3×3 matrices as row-major 9-element Float64Arrays, for colour-space conversions.
 * Plain linear algebra (cofactor inverse); no reference needed beyond any linear-algebra text.
 */

export type Matrix3 = Float64Array;

export function matrix3(rows: readonly (readonly number[])[]): Matrix3 {
  if (rows.length !== 3 || rows.some((row) => row.length !== 3)) {
    throw new TypeError(`matrix3 expects 3 rows of 3 numbers, received ${JSON.stringify(rows)}`);
  }
  return Float64Array.from(rows.flat());
}

export function multiplyMatrix3(a: Matrix3, b: Matrix3): Matrix3 {
  const out = new Float64Array(9);
  for (let r = 0; r < 3; r++) {
    for (let c = 0; c < 3; c++) {
      out[r * 3 + c] = a[r * 3] * b[c] + a[r * 3 + 1] * b[3 + c] + a[r * 3 + 2] * b[6 + c];
    }
  }
  return out;
}

export function invertMatrix3(m: Matrix3): Matrix3 {
  const [a, b, c, d, e, f, g, h, i] = m;
  const c00 = e * i - f * h;
  const c01 = -(d * i - f * g);
  const c02 = d * h - e * g;
  const det = a * c00 + b * c01 + c * c02;
  if (!Number.isFinite(det) || Math.abs(det) < 1e-300) throw new RangeError(`matrix is singular (determinant ${det})`);
  const inv = 1 / det;
  return Float64Array.of(
    c00 * inv, -(b * i - c * h) * inv, (b * f - c * e) * inv,
    c01 * inv, (a * i - c * g) * inv, -(a * f - c * d) * inv,
    c02 * inv, -(a * h - b * g) * inv, (a * e - b * d) * inv,
  );
}

/** m · v for a 3-vector. */
export function applyMatrix3(m: Matrix3, v: ArrayLike<number>): [number, number, number] {
  return [
    m[0] * v[0] + m[1] * v[1] + m[2] * v[2],
    m[3] * v[0] + m[4] * v[1] + m[5] * v[2],
    m[6] * v[0] + m[7] * v[1] + m[8] * v[2],
  ];
}

export function diagonalMatrix3(d0: number, d1: number, d2: number): Matrix3 {
  return Float64Array.of(d0, 0, 0, 0, d1, 0, 0, 0, d2);
}
