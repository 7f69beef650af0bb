/**
 * Cauchy-type dispersion formula as stored in `shared/materials/*.json`:
 *   n = A + Σ_i B_i·L^p_i,  L = vacuum wavelength in µm (p_i usually −2, −4; Rubin 1985 also uses +2).
 * Reference: A.-L. Cauchy, Mémoire sur la dispersion de la lumière (1836); general exponent form as
 * used by the refractiveindex.info database (Polyanskiy 2024, Sci. Data 11, 94), see
 * `shared/materials/SOURCES.md`.
 */

export interface CauchyCoefficients {
  readonly A: number;
  readonly B: readonly number[];
  /** Exponents of L (same length as B). */
  readonly p: readonly number[];
}

/** Binds the coefficients once and returns `(wavelengthNm) => n`. */
export function cauchy(coefficients: CauchyCoefficients): (wavelengthNm: number) => number {
  const { A } = coefficients;
  const B = Float64Array.from(coefficients.B);
  const p = Float64Array.from(coefficients.p);
  if (B.length !== p.length) {
    throw new RangeError(`cauchy: B and p must have the same length, received ${B.length} and ${p.length}`);
  }
  const terms = B.length;
  return (wavelengthNm: number): number => {
    const L = wavelengthNm / 1000;
    let n = A;
    for (let i = 0; i < terms; i++) n += B[i] * Math.pow(L, p[i]);
    return n;
  };
}
