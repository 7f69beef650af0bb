/**
 * Free film in air under one spectral line: Airy reflectance and its inversion, the
 * microinterferometric formula of Scheludko.
 *
 * References (bibliographic details from memory, not re-checked against the papers):
 * - A. Scheludko, "Thin liquid films", Adv. Colloid Interface Sci. 1, 391–464 (1967).
 * - A. Scheludko and D. Platikanov, Kolloid-Z. 175, 150 (1961).
 * - Airy summation of multiple beams for one non-absorbing layer: any optics textbook
 *   (e.g. Born & Wolf, Principles of Optics, §7.6; from memory).
 *
 * Derivation (checked here, not copied). A film of index n and thickness h in air, light at
 * angle θ inside the film. With the single-surface Fresnel amplitude r (r = (1 − n)/(1 + n) at
 * normal incidence; the same |r| on both faces with opposite sign) and the phase
 * δ = 2π n h cos θ / λ, the Airy sum of all reflected beams gives
 *     R = 4r² sin²δ / ((1 − r²)² + 4r² sin²δ).
 * R is 0 at δ = lπ and largest, Rmax = 4r² / (1 + r²)², at δ = (l + ½)π (quarter-wave film).
 * With intensities on a linear camera scale, Δ = (I − Imin)/(Imax − Imin) = R / Rmax. Writing
 * s = sin²δ, A = 4r², B = (1 − r²)² (so A + B = (1 + r²)²):
 *     Δ (B + A s) = s (A + B)  ⇒  s = Δ B / (B + A (1 − Δ)) = Δ / (1 + 4r²(1 − Δ)/(1 − r²)²),
 * hence  h = λ / (2π n cos θ) · [ lπ ± arcsin √( Δ / (1 + 4r²(1 − Δ)/(1 − r²)²) ) ],
 * the formula of Scheludko (written there for normal incidence, cos θ = 1). The + sign holds
 * on the rising branches (R increases with h: lπ ≤ δ ≤ lπ + π/2), the − sign on the falling
 * ones (lπ − π/2 ≤ δ ≤ lπ).
 *
 * Choice made here: at oblique incidence only the phase uses cos θ; r stays the normal-incidence
 * value (the formula's own approximation). For exact oblique or polarised work, and for any
 * film on a substrate, use the transfer-matrix table (`lineReflectanceTable.ts`).
 */

/** Refraction angle inside the film (rad) for light from air at `angleRad`. */
function cosInside(filmIndex: number, angleRad: number): number {
  const sinT = Math.sin(angleRad) / filmIndex;
  return Math.sqrt(1 - sinT * sinT);
}

function checkFilm(wavelengthNm: number, filmIndex: number, angleRad: number): void {
  if (!Number.isFinite(wavelengthNm) || wavelengthNm <= 0) {
    throw new RangeError(`wavelengthNm must be a finite number > 0, received ${wavelengthNm}`);
  }
  if (!Number.isFinite(filmIndex) || filmIndex <= 1) {
    throw new RangeError(`filmIndex must be a finite number > 1, received ${filmIndex}`);
  }
  if (!Number.isFinite(angleRad) || angleRad < 0 || angleRad >= Math.PI / 2) {
    throw new RangeError(`angleRad must be in [0, π/2), received ${angleRad}`);
  }
}

/** Single-surface Fresnel amplitude reflection coefficient air → film at normal incidence. */
export function fresnelAmplitudeNormal(filmIndex: number): number {
  return (1 - filmIndex) / (1 + filmIndex);
}

/** Largest reflectance of a free film, reached at the quarter-wave thickness: 4r²/(1 + r²)². */
export function freeFilmPeakReflectance(filmIndex: number): number {
  const r2 = fresnelAmplitudeNormal(filmIndex) ** 2;
  return (4 * r2) / ((1 + r2) * (1 + r2));
}

/** Airy reflectance of a free film of index `filmIndex` in air at one wavelength. */
export function airyFreeFilmReflectance(
  thicknessNm: number,
  wavelengthNm: number,
  filmIndex: number,
  angleRad = 0,
): number {
  checkFilm(wavelengthNm, filmIndex, angleRad);
  const r2 = fresnelAmplitudeNormal(filmIndex) ** 2;
  const delta = (2 * Math.PI * filmIndex * thicknessNm * cosInside(filmIndex, angleRad)) / wavelengthNm;
  const s = Math.sin(delta) ** 2;
  return (4 * r2 * s) / ((1 - r2) * (1 - r2) + 4 * r2 * s);
}

export interface ScheludkoOptions {
  readonly wavelengthNm: number;
  readonly filmIndex: number;
  /** Interference order l >= 0 (integer). */
  readonly order: number;
  /** `rising`: + sign (R grows with h); `falling`: − sign. */
  readonly branch: 'rising' | 'falling';
  readonly angleRad?: number;
}

/**
 * Thickness (nm) of a free film from its normalised intensity Δ = (I − Imin)/(Imax − Imin),
 * by the formula of Scheludko. Δ is clamped to [0, 1] (noise beyond the extremes).
 */
export function scheludkoThicknessNm(normalisedIntensity: number, options: ScheludkoOptions): number {
  const { wavelengthNm, filmIndex, order, branch } = options;
  const angleRad = options.angleRad ?? 0;
  checkFilm(wavelengthNm, filmIndex, angleRad);
  if (!Number.isInteger(order) || order < 0) {
    throw new RangeError(`order must be an integer >= 0, received ${order}`);
  }
  if (branch !== 'rising' && branch !== 'falling') {
    throw new TypeError(`branch must be 'rising' or 'falling', received ${String(branch)}`);
  }
  if (branch === 'falling' && order === 0) {
    throw new RangeError('order must be >= 1 on a falling branch (order 0 falls below zero thickness), received 0');
  }
  if (Number.isNaN(normalisedIntensity)) {
    throw new RangeError('normalisedIntensity must be a number, received NaN');
  }
  const d = Math.min(1, Math.max(0, normalisedIntensity));
  const r2 = fresnelAmplitudeNormal(filmIndex) ** 2;
  const s = d / (1 + (4 * r2 * (1 - d)) / ((1 - r2) * (1 - r2)));
  const phase = Math.asin(Math.sqrt(s));
  const delta = order * Math.PI + (branch === 'rising' ? phase : -phase);
  return (wavelengthNm * delta) / (2 * Math.PI * filmIndex * cosInside(filmIndex, angleRad));
}
