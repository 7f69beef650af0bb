/**
 * Dispersion formula for gases (used for air):
 *   n − 1 = A + Σ_i B_i / (C_i − L⁻²),  L = vacuum wavelength in µm, C_i in µm⁻².
 * Reference: P. E. Ciddor, "Refractive index of air: new equations for the visible and near
 * infrared", Appl. Opt. 35, 1566–1573 (1996), doi:10.1364/AO.35.001566, eq. (1) (standard air);
 * storage form as in `shared/materials/SOURCES.md`.
 */

export interface GasFormulaCoefficients {
  readonly A: number;
  readonly B: readonly number[];
  /** In µm⁻² (same length as B). */
  readonly C: readonly number[];
}

/** Binds the coefficients once and returns `(wavelengthNm) => n`. */
export function gasFormula(coefficients: GasFormulaCoefficients): (wavelengthNm: number) => number {
  const { A } = coefficients;
  const B = Float64Array.from(coefficients.B);
  const C = Float64Array.from(coefficients.C);
  if (B.length !== C.length) {
    throw new RangeError(`gasFormula: B and C must have the same length, received ${B.length} and ${C.length}`);
  }
  const terms = B.length;
  return (wavelengthNm: number): number => {
    const L = wavelengthNm / 1000;
    const inv2 = 1 / (L * L);
    let nMinus1 = A;
    for (let i = 0; i < terms; i++) nMinus1 += B[i] / (C[i] - inv2);
    return 1 + nMinus1;
  };
}
