/**
 * Sellmeier dispersion formula, SCHOTT convention as stored in `shared/materials/*.json`:
 *   n² = 1 + A + Σ_i B_i·L²/(L² − C_i),  L = vacuum wavelength in µm, C_i in µm².
 * Reference: W. Sellmeier, Ann. Phys. 219, 272 (1871); form and coefficient conventions as in
 * `shared/materials/SOURCES.md` (sources that publish resonance wavelengths L0 were converted
 * there to C = L0²).
 */

export interface SellmeierCoefficients {
  readonly A: number;
  readonly B: readonly number[];
  /** Resonance terms in µm² (same length as B). */
  readonly C: readonly number[];
}

/** Binds the coefficients once and returns `(wavelengthNm) => n`. */
export function sellmeier(coefficients: SellmeierCoefficients): (wavelengthNm: number) => number {
  const { A } = coefficients;
  const B = Float64Array.from(coefficients.B);
  const C = Float64Array.from(coefficients.C);
  if (B.length !== C.length) {
    throw new RangeError(`sellmeier: B and C must have the same length, received ${B.length} and ${C.length}`);
  }
  const terms = B.length;
  return (wavelengthNm: number): number => {
    const L = wavelengthNm / 1000;
    const L2 = L * L;
    let n2 = 1 + A;
    for (let i = 0; i < terms; i++) n2 += (B[i] * L2) / (L2 - C[i]);
    if (!(n2 > 0)) {
      throw new RangeError(`sellmeier: n² = ${n2} is not positive at ${wavelengthNm} nm (near a pole of the formula)`);
    }
    return Math.sqrt(n2);
  };
}
