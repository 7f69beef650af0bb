/**
 * Reflectance and transmittance of a stack for a grid of film thicknesses × wavelengths, by the
 * characteristic-matrix (Abelès) method. Reference: H. A. Macleod, Thin-Film Optical Filters
 * (4th ed.), ch. 2: [B; C] = Π_j M_j · [1; η_sub] with M_j = [[cos δ, −i sin δ/η], [−i η sin δ, cos δ]]
 * (Macleod's matrix written for N = n + ik, i.e. complex-conjugated, see ./stackTerms.ts), r = (η0·B − C)/(η0·B + C), R = |r|²,
 * T = 4·η0·Re(η_sub)/|η0·B + C|² (tilted admittances, valid at oblique incidence and for an
 * absorbing exit medium), A = 1 − R − T. Unpolarised ('mixed') light: R = (R_s + R_p)/2, same for T.
 * Incoherent thick substrate (back side facing `exitMedium`), intensities added over multiple
 * passes (Macleod ch. 2, "thick substrates"; common practice):
 *   R = R1 + T1·T1'·R2·a² / (1 − R1'·R2·a²),   T = T1·T2·a / (1 − R1'·R2·a²),
 * with R1, T1 of the coherent stack seen from the ambient, R1', T1' seen from the substrate (the
 * reversed product of layer matrices is the same product with its diagonal swapped), R2, T2 of the
 * substrate/exit interface and a = single-pass intensity transmission of the slab.
 * The inner loop over thicknesses and wavelengths does scalar arithmetic only (no allocation).
 * The incidence medium is taken as lossless (its k is ignored). Im δ of a layer is capped at
 * MAX_DECAY (amplitude e^-40 ≈ 4e-18 through it): beyond that a layer is opaque to double precision
 * and cosh/sinh would overflow.
 */
import { MAX_DECAY, MIDDLE_STRIDE, prepareStackTerms } from './stackTerms.js';
import type { Polarisation, Stack } from './types.js';

export interface FilmSpectraGrid {
  readonly wavelengthsNm: Float64Array;
  readonly thicknessesNm: Float64Array;
  readonly angleRad: number;
  readonly polarisation: Polarisation;
  /** Multiplies n(λ) of every 'film' layer (k unchanged); default 1. */
  readonly filmIndexScale?: number;
}

export interface FilmSpectraResult {
  /** Value for thickness i, wavelength j at [i * wavelengthsNm.length + j]; fractions 0–1. */
  readonly reflectance: Float64Array;
  readonly transmittance: Float64Array;
}

function checkGrid(stack: Stack, grid: FilmSpectraGrid): number {
  if (!(grid.wavelengthsNm instanceof Float64Array)) throw new TypeError('filmSpectra: wavelengthsNm must be a Float64Array');
  if (!(grid.thicknessesNm instanceof Float64Array)) throw new TypeError('filmSpectra: thicknessesNm must be a Float64Array');
  for (const w of grid.wavelengthsNm) {
    if (!Number.isFinite(w) || w <= 0) throw new RangeError(`filmSpectra: wavelengthsNm must be finite numbers > 0, received ${w}`);
  }
  for (const d of grid.thicknessesNm) {
    if (!Number.isFinite(d) || d < 0) throw new RangeError(`filmSpectra: thicknessNm must be a finite number >= 0, received ${d}`);
  }
  const a = grid.angleRad;
  if (typeof a !== 'number' || !Number.isFinite(a) || a < 0 || a >= Math.PI / 2) {
    throw new RangeError(`filmSpectra: angleRad must be a finite number in [0, π/2), received ${a}`);
  }
  if (grid.polarisation !== 's' && grid.polarisation !== 'p' && grid.polarisation !== 'mixed') {
    throw new RangeError(`filmSpectra: polarisation must be 's', 'p' or 'mixed', received ${String(grid.polarisation)}`);
  }
  const scale = grid.filmIndexScale ?? 1;
  if (!Number.isFinite(scale) || scale <= 0) throw new RangeError(`filmSpectra: filmIndexScale must be a finite number > 0, received ${scale}`);
  for (const layer of stack.layers) {
    const d = layer.thicknessNm;
    if (d !== 'film' && (!Number.isFinite(d) || d < 0)) {
      throw new RangeError(`filmSpectra: layer ${layer.material.name} thicknessNm must be 'film' or a finite number >= 0, received ${d}`);
    }
  }
  return scale;
}

/** R and T for every (thickness, wavelength) pair of the grid. */
export function filmSpectra(stack: Stack, grid: FilmSpectraGrid): FilmSpectraResult {
  const scale = checkGrid(stack, grid);
  const { wavelengthsNm, thicknessesNm } = grid;
  const W = wavelengthsNm.length;
  const D = thicknessesNm.length;
  const reflectance = new Float64Array(D * W);
  const transmittance = new Float64Array(D * W);
  if (W === 0 || D === 0) return { reflectance, transmittance };
  const terms = prepareStackTerms(stack, wavelengthsNm, grid.angleRad, scale);
  const { eta0, etaSub, topMatrix: tm, bottomVector: bv, topReverseVector: trv, bottomReverseMatrix: brm, back } = terms;
  const middle = terms.middle;
  const M = middle.length;
  const isFilm = middle.map((layer) => layer.isFilm);
  const layerTerms = middle.map((layer) => layer.terms);
  const cosSin = new Float64Array(M * 4); // scratch: cos δ, sin δ of each middle layer
  const polFrom = grid.polarisation === 'p' ? 1 : 0;
  const polTo = grid.polarisation === 's' ? 1 : 2;
  const weight = 1 / (polTo - polFrom);
  for (let i = 0; i < D; i++) {
    const d = thicknessesNm[i];
    for (let j = 0; j < W; j++) {
      const o = j * MIDDLE_STRIDE;
      for (let m = 0; m < M; m++) {
        const t = layerTerms[m];
        if (isFilm[m]) {
          const a = t[o] * d;
          const b = Math.min(t[o + 1] * d, MAX_DECAY); // opaque beyond: avoids cosh overflow
          const ca = Math.cos(a);
          const sa = Math.sin(a);
          if (b === 0) {
            cosSin[m * 4] = ca;
            cosSin[m * 4 + 1] = 0;
            cosSin[m * 4 + 2] = sa;
            cosSin[m * 4 + 3] = 0;
          } else {
            const ch = Math.cosh(b);
            const sh = Math.sinh(b);
            cosSin[m * 4] = ca * ch;
            cosSin[m * 4 + 1] = -sa * sh;
            cosSin[m * 4 + 2] = sa * ch;
            cosSin[m * 4 + 3] = ca * sh;
          }
        } else {
          cosSin[m * 4] = t[o + 10];
          cosSin[m * 4 + 1] = t[o + 11];
          cosSin[m * 4 + 2] = t[o + 12];
          cosSin[m * 4 + 3] = t[o + 13];
        }
      }
      let rSum = 0;
      let tSum = 0;
      for (let pol = polFrom; pol < polTo; pol++) {
        const jp = j * 2 + pol;
        const e0 = eta0[jp];
        const esr = etaSub[jp * 2];
        const esi = etaSub[jp * 2 + 1];
        const eo = o + 2 + pol * 4; // η re, im, 1/η re, im of this polarisation
        // forward: [B; C] = M_top · Π middle · (M_bottom · [1; η_sub])
        let Br = bv[jp * 4];
        let Bi = bv[jp * 4 + 1];
        let Cr = bv[jp * 4 + 2];
        let Ci = bv[jp * 4 + 3];
        for (let m = M - 1; m >= 0; m--) {
          const t = layerTerms[m];
          const cr = cosSin[m * 4], ci = cosSin[m * 4 + 1], sr = cosSin[m * 4 + 2], si = cosSin[m * 4 + 3];
          const er = t[eo], ei = t[eo + 1], yr = t[eo + 2], yi = t[eo + 3];
          const ar = sr * yr - si * yi, ai = sr * yi + si * yr; // sin δ / η
          const gr = er * sr - ei * si, gi = er * si + ei * sr; // η sin δ
          const nBr = cr * Br - ci * Bi + ai * Cr + ar * Ci;
          const nBi = cr * Bi + ci * Br - ar * Cr + ai * Ci;
          const nCr = gi * Br + gr * Bi + cr * Cr - ci * Ci;
          const nCi = -gr * Br + gi * Bi + cr * Ci + ci * Cr;
          Br = nBr; Bi = nBi; Cr = nCr; Ci = nCi;
        }
        const q = jp * 8;
        const fBr = tm[q] * Br - tm[q + 1] * Bi + tm[q + 2] * Cr - tm[q + 3] * Ci;
        const fBi = tm[q] * Bi + tm[q + 1] * Br + tm[q + 2] * Ci + tm[q + 3] * Cr;
        const fCr = tm[q + 4] * Br - tm[q + 5] * Bi + tm[q + 6] * Cr - tm[q + 7] * Ci;
        const fCi = tm[q + 4] * Bi + tm[q + 5] * Br + tm[q + 6] * Ci + tm[q + 7] * Cr;
        const numR = e0 * fBr - fCr, numI = e0 * fBi - fCi;
        const denR = e0 * fBr + fCr, denI = e0 * fBi + fCi;
        const den2 = denR * denR + denI * denI;
        const r1 = (numR * numR + numI * numI) / den2;
        const t1 = (4 * e0 * esr) / den2;
        if (back === null) {
          rSum += r1;
          tSum += t1;
          continue;
        }
        // reverse: [B'; C'] = M_bottom' · Π middle (top to bottom) · (M_top' · [1; η0])
        Br = trv[jp * 4];
        Bi = trv[jp * 4 + 1];
        Cr = trv[jp * 4 + 2];
        Ci = trv[jp * 4 + 3];
        for (let m = 0; m < M; m++) {
          const t = layerTerms[m];
          const cr = cosSin[m * 4], ci = cosSin[m * 4 + 1], sr = cosSin[m * 4 + 2], si = cosSin[m * 4 + 3];
          const er = t[eo], ei = t[eo + 1], yr = t[eo + 2], yi = t[eo + 3];
          const ar = sr * yr - si * yi, ai = sr * yi + si * yr;
          const gr = er * sr - ei * si, gi = er * si + ei * sr;
          const nBr = cr * Br - ci * Bi + ai * Cr + ar * Ci;
          const nBi = cr * Bi + ci * Br - ar * Cr + ai * Ci;
          const nCr = gi * Br + gr * Bi + cr * Cr - ci * Ci;
          const nCi = -gr * Br + gi * Bi + cr * Ci + ci * Cr;
          Br = nBr; Bi = nBi; Cr = nCr; Ci = nCi;
        }
        const rBr = brm[q] * Br - brm[q + 1] * Bi + brm[q + 2] * Cr - brm[q + 3] * Ci;
        const rBi = brm[q] * Bi + brm[q + 1] * Br + brm[q + 2] * Ci + brm[q + 3] * Cr;
        const rCr = brm[q + 4] * Br - brm[q + 5] * Bi + brm[q + 6] * Cr - brm[q + 7] * Ci;
        const rCi = brm[q + 4] * Bi + brm[q + 5] * Br + brm[q + 6] * Ci + brm[q + 7] * Cr;
        // seen from the substrate: r' = (η_sub B' − C')/(η_sub B' + C')
        const sBr = esr * rBr - esi * rBi, sBi = esr * rBi + esi * rBr;
        const pR = sBr - rCr, pI = sBi - rCi, qR = sBr + rCr, qI = sBi + rCi;
        const q2 = qR * qR + qI * qI;
        const r1Back = (pR * pR + pI * pI) / q2;
        const t1Back = (4 * esr * e0) / q2;
        const r2 = back.r2[jp];
        const a = back.attenuation[j];
        const loop = 1 / (1 - r1Back * r2 * a * a);
        rSum += r1 + t1 * t1Back * r2 * a * a * loop;
        tSum += t1 * back.t2[jp] * a * loop;
      }
      reflectance[i * W + j] = rSum * weight;
      transmittance[i * W + j] = tSum * weight;
    }
  }
  return { reflectance, transmittance };
}
