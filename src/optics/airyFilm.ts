/**
 * Single film between two semi-infinite media by the Airy summation (closed form), used as an
 * independent check of the matrix engine and for quick estimates.
 * Reference: M. Born and E. Wolf, Principles of Optics (7th ed.), §7.6.1, eqs. (57)–(58):
 *   r = (r01 + r12·e^{2iβ}) / (1 + r01·r12·e^{2iβ}),  t = t01·t12·e^{iβ} / (1 + r01·r12·e^{2iβ}),
 *   β = 2π·N1·d·cosθ1/λ. Fresnel coefficients here are written with tilted admittances
 *   (Macleod, Thin-Film Optical Filters, §2.2): r_ab = (η_a − η_b)/(η_a + η_b),
 *   t_ab = 2η_a/(η_a + η_b) for tangential fields, and T = Re(η2)/η0 · |t|².
 */
import { cdiv, cmul, csqrtForward, type Complex } from './complex.js';
import type { ComplexIndex } from './types.js';

/** R and T of ambient n0 | film (N1, thicknessNm) | substrate N2 for one polarisation (0 = s, 1 = p). */
export function airyFilm(
  n0: number,
  film: ComplexIndex,
  substrate: ComplexIndex,
  thicknessNm: number,
  wavelengthNm: number,
  angleRad: number,
  polarisation: 's' | 'p',
): { reflectance: number; transmittance: number } {
  const beta = n0 * Math.sin(angleRad);
  const eta = (index: ComplexIndex): Complex => {
    const N: Complex = [index.n, index.k];
    const N2 = cmul(N, N);
    const q = csqrtForward([N2[0] - beta * beta, N2[1]]);
    return polarisation === 's' ? q : cdiv(N2, q);
  };
  const e0: Complex = polarisation === 's' ? [n0 * Math.cos(angleRad), 0] : [n0 / Math.cos(angleRad), 0];
  const e1 = eta(film);
  const e2 = eta(substrate);
  const N1: Complex = [film.n, film.k];
  const q1 = csqrtForward([cmul(N1, N1)[0] - beta * beta, cmul(N1, N1)[1]]);
  const phase = (2 * Math.PI * thicknessNm) / wavelengthNm;
  const b: Complex = [phase * q1[0], phase * q1[1]];
  const add = (x: Complex, y: Complex): Complex => [x[0] + y[0], x[1] + y[1]];
  const sub = (x: Complex, y: Complex): Complex => [x[0] - y[0], x[1] - y[1]];
  const r01 = cdiv(sub(e0, e1), add(e0, e1));
  const r12 = cdiv(sub(e1, e2), add(e1, e2));
  const t01 = cdiv([2 * e0[0], 2 * e0[1]], add(e0, e1));
  const t12 = cdiv([2 * e1[0], 2 * e1[1]], add(e1, e2));
  const expI = (x: Complex): Complex => {
    const m = Math.exp(-x[1]);
    return [m * Math.cos(x[0]), m * Math.sin(x[0])];
  };
  const e2ib = expI([2 * b[0], 2 * b[1]]);
  const denominator = add([1, 0], cmul(cmul(r01, r12), e2ib));
  const r = cdiv(add(r01, cmul(r12, e2ib)), denominator);
  const t = cdiv(cmul(cmul(t01, t12), expI(b)), denominator);
  return {
    reflectance: r[0] * r[0] + r[1] * r[1],
    transmittance: (e2[0] / e0[0]) * (t[0] * t[0] + t[1] * t[1]),
  };
}
