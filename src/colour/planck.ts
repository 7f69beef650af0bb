/**
 * Planck's law for the relative spectral power of a blackbody, normalised to 100 at 560 nm:
 *   S(λ) = 100 · (560/λ)^5 · [exp(c2 / (560e-9 · T)) − 1] / [exp(c2 / (λ·1e-9 · T)) − 1]
 * (CIE 15:2004 §3.1; ISO/CIE 11664-2:2022 eq. 1).
 * Note on c2: the CIE defines illuminant A with the old value c2 = 1.435e-2 m·K and T = 2848 K;
 * on the current temperature scale (c2 = 1.4388e-2 m·K, the value CIE 15:2004 uses for
 * Planckian radiators) the same spectrum is a blackbody at about 2856 K (2848 · 1.4388/1.435 =
 * 2855.54 K). Our tests confirm it: only (1.435e-2, 2848 K) reproduces the CIE's 6-digit table;
 * (1.4388e-2, 2856 K) differs by up to 0.07 % over 380–780 nm.
 * `blackbody:<K>` lights take T on the current scale and use c2 = 1.4388e-2 m·K.
 */

/** Second radiation constant as CIE 15:2004 uses it for Planckian radiators, in m·K. */
export const C2_CIE_M_K = 1.4388e-2;
/** The constants with which the CIE computed its illuminant A table (ISO/CIE 11664-2:2022 eq. 1). */
export const ILLUMINANT_A_C2_M_K = 1.435e-2;
export const ILLUMINANT_A_TEMPERATURE_K = 2848;

/** Relative spectral power (100 at 560 nm) of a blackbody at `temperatureK`, at `wavelengthNm`. */
export function planckRelativeSpd(wavelengthNm: number, temperatureK: number, c2MK: number = C2_CIE_M_K): number {
  const ratio = 560 / wavelengthNm;
  return (
    100 * ratio ** 5 * (Math.expm1(c2MK / (560e-9 * temperatureK)) / Math.expm1(c2MK / (wavelengthNm * 1e-9 * temperatureK)))
  );
}

/** Checks a blackbody temperature: finite, 500–100000 K (the useful range for colour work). */
export function checkTemperatureK(temperatureK: number, name = 'blackbody temperature'): number {
  if (!Number.isFinite(temperatureK) || temperatureK < 500 || temperatureK > 100000) {
    throw new RangeError(`${name} must be a number of kelvin between 500 and 100000, received ${temperatureK}`);
  }
  return temperatureK;
}
