/**
 * Per-wavelength set-up of the transfer-matrix (characteristic-matrix) engine: every term that
 * depends on index, angle and polarisation but not on the film thickness is computed here once.
 * Reference: H. A. Macleod, Thin-Film Optical Filters (4th ed.), ch. 2, §2.2–2.4: characteristic
 * matrix [[cos δ, i sin δ/η], [i η sin δ, cos δ]] per layer, δ = 2π N d cosθ / λ, written there for
 * N = n − ik (time factor e^{iωt}). We use N = n + ik (e^{−iωt}, Born & Wolf), which conjugates
 * every quantity: the matrix becomes [[cos δ, −i sin δ/η], [−i η sin δ, cos δ]]; |r|², T unchanged
 * in form. Tilted optical
 * admittances (units of the free-space admittance) η_s = N cosθ, η_p = N / cosθ; Snell's law
 * N sinθ = n0 sinθ0 with complex cosθ on the branch Im(N cosθ) >= 0 (Born & Wolf, Principles of
 * Optics, §1.6 and §14.2). Polarisation index: 0 = s (TE), 1 = p (TM).
 * Layers of the stack are split into top (fixed, above the first film layer), middle (from the first
 * to the last film layer) and bottom (fixed, below the last film layer): top and bottom products
 * are precomputed, only the middle is redone per thickness.
 */
import { ccosSin, cdiv, cmul, csqrtForward, type Complex } from './complex.js';
import type { Material, Stack } from './types.js';

/** Middle-layer record: per wavelength j, values at [j * STRIDE + offset]. */
export interface MiddleLayerTerms {
  readonly isFilm: boolean;
  /** Layout per wavelength (stride 16): φ re, im (phase per nm, δ = φ·d); η_s re, im; 1/η_s re, im;
   * η_p re, im; 1/η_p re, im; for fixed layers cos δ re, im, sin δ re, im; 2 spare. */
  readonly terms: Float64Array;
}

export const MIDDLE_STRIDE = 16;

export interface StackTerms {
  readonly wavelengthCount: number;
  /** Ambient admittance (real) per [j * 2 + pol]. */
  readonly eta0: Float64Array;
  /** Substrate admittance re, im per [(j * 2 + pol) * 2]. */
  readonly etaSub: Float64Array;
  /** Top product M_top per (j, pol): 8 numbers (m11, m12, m21, m22 as re, im pairs). */
  readonly topMatrix: Float64Array;
  /** Bottom vector M_bottom · [1, η_sub] per (j, pol): 4 numbers (B re, im, C re, im). */
  readonly bottomVector: Float64Array;
  /** For the reverse direction: M_top' · [1, η0] (4 numbers) and M_bottom' (8 numbers), ' = reversed order. */
  readonly topReverseVector: Float64Array;
  readonly bottomReverseMatrix: Float64Array;
  readonly middle: readonly MiddleLayerTerms[];
  /** Incoherent back side: R2, T2 at the substrate/exit interface per (j, pol), and single-pass
   * intensity attenuation in the substrate per j. Absent without an incoherent back side. */
  readonly back: { readonly r2: Float64Array; readonly t2: Float64Array; readonly attenuation: Float64Array } | null;
}

const TINY = 1e-12;

/** Cap on Im δ (see ./filmSpectra.ts): a layer with more decay is opaque at double precision. */
export const MAX_DECAY = 40;

function complexIndex(material: Material, wavelengthNm: number, scale: number): Complex {
  const { n, k } = material.indexAt(wavelengthNm);
  return [n * scale, k];
}

/** q = N cosθ, η_s = q, η_p = N²/q for the conserved β = n0 sinθ0. */
function admittances(index: Complex, beta: number): { q: Complex; eta: [Complex, Complex] } {
  const n2 = cmul(index, index);
  let q = csqrtForward([n2[0] - beta * beta, n2[1]]);
  if (q[0] * q[0] + q[1] * q[1] < TINY * TINY) q = [TINY, 0]; // exactly at a critical angle
  return { q, eta: [q, cdiv(n2, q)] };
}

type Matrix = [Complex, Complex, Complex, Complex];

function layerMatrix(delta: Complex, eta: Complex): Matrix {
  const { cos, sin } = ccosSin(delta);
  const sOverEta = cdiv(sin, eta);
  const etaS = cmul(eta, sin);
  // −i·x for x = sin δ/η and x = η sin δ
  return [cos, [sOverEta[1], -sOverEta[0]], [etaS[1], -etaS[0]], cos];
}

function matMul(a: Matrix, b: Matrix): Matrix {
  const add = (x: Complex, y: Complex): Complex => [x[0] + y[0], x[1] + y[1]];
  return [
    add(cmul(a[0], b[0]), cmul(a[1], b[2])),
    add(cmul(a[0], b[1]), cmul(a[1], b[3])),
    add(cmul(a[2], b[0]), cmul(a[3], b[2])),
    add(cmul(a[2], b[1]), cmul(a[3], b[3])),
  ];
}

function matVec(m: Matrix, v: [Complex, Complex]): [Complex, Complex] {
  const add = (x: Complex, y: Complex): Complex => [x[0] + y[0], x[1] + y[1]];
  return [add(cmul(m[0], v[0]), cmul(m[1], v[1])), add(cmul(m[2], v[0]), cmul(m[3], v[1]))];
}

/** Reversal of a product of layer matrices: swap the diagonal (Macleod ch. 2, reverse direction). */
function reversed(m: Matrix): Matrix {
  return [m[3], m[1], m[2], m[0]];
}

const IDENTITY: Matrix = [[1, 0], [0, 0], [0, 0], [1, 0]];

function put(target: Float64Array, offset: number, values: readonly Complex[]): void {
  for (let i = 0; i < values.length; i++) {
    target[offset + 2 * i] = values[i][0];
    target[offset + 2 * i + 1] = values[i][1];
  }
}

/** Precomputes the thickness-independent terms for `filmSpectra`. */
export function prepareStackTerms(stack: Stack, wavelengthsNm: Float64Array, angleRad: number, filmIndexScale: number): StackTerms {
  const W = wavelengthsNm.length;
  const layers = stack.layers;
  const first = layers.findIndex((layer) => layer.thicknessNm === 'film');
  const last = first < 0 ? -1 : layers.length - 1 - [...layers].reverse().findIndex((layer) => layer.thicknessNm === 'film');
  const topEnd = first < 0 ? layers.length : first;
  const bottomStart = first < 0 ? layers.length : last + 1;
  const eta0 = new Float64Array(W * 2);
  const etaSub = new Float64Array(W * 4);
  const topMatrix = new Float64Array(W * 16);
  const bottomVector = new Float64Array(W * 8);
  const topReverseVector = new Float64Array(W * 8);
  const bottomReverseMatrix = new Float64Array(W * 16);
  const middle: MiddleLayerTerms[] = [];
  for (let m = topEnd; m < bottomStart; m++) {
    middle.push({ isFilm: layers[m].thicknessNm === 'film', terms: new Float64Array(W * MIDDLE_STRIDE) });
  }
  const back = stack.incoherentBack
    ? { r2: new Float64Array(W * 2), t2: new Float64Array(W * 2), attenuation: new Float64Array(W) }
    : null;
  const sin0 = Math.sin(angleRad);
  const cos0 = Math.cos(angleRad);
  for (let j = 0; j < W; j++) {
    const wavelengthNm = wavelengthsNm[j];
    const n0 = stack.ambient.indexAt(wavelengthNm).n; // the incidence medium is taken as lossless
    const beta = n0 * sin0;
    const k0 = (2 * Math.PI) / wavelengthNm;
    const layerTerms = layers.map((layer) => {
      const scale = layer.thicknessNm === 'film' ? filmIndexScale : 1;
      const { q, eta } = admittances(complexIndex(layer.material, wavelengthNm, scale), beta);
      return { q, eta, phase: [k0 * q[0], k0 * q[1]] as Complex, thicknessNm: layer.thicknessNm };
    });
    const sub = admittances(complexIndex(stack.substrate, wavelengthNm, 1), beta);
    for (let pol = 0; pol < 2; pol++) {
      const etaAmbient = pol === 0 ? n0 * cos0 : n0 / cos0;
      eta0[j * 2 + pol] = etaAmbient;
      put(etaSub, (j * 2 + pol) * 2, [sub.eta[pol]]);
      const fixed = (from: number, to: number): Matrix => {
        let product = IDENTITY;
        for (let m = from; m < to; m++) {
          const t = layerTerms[m];
          const d = t.thicknessNm as number;
          product = matMul(product, layerMatrix([t.phase[0] * d, Math.min(t.phase[1] * d, MAX_DECAY)], t.eta[pol]));
        }
        return product;
      };
      const top = fixed(0, topEnd);
      const bottom = fixed(bottomStart, layers.length);
      put(topMatrix, (j * 2 + pol) * 8, top);
      put(bottomVector, (j * 2 + pol) * 4, matVec(bottom, [[1, 0], sub.eta[pol]]));
      put(topReverseVector, (j * 2 + pol) * 4, matVec(reversed(top), [[1, 0], [etaAmbient, 0]]));
      put(bottomReverseMatrix, (j * 2 + pol) * 8, reversed(bottom));
      if (back && stack.incoherentBack) {
        const exit = admittances(complexIndex(stack.incoherentBack.exitMedium, wavelengthNm, 1), beta);
        const es = sub.eta[pol];
        const ee = exit.eta[pol];
        const sum: Complex = [es[0] + ee[0], es[1] + ee[1]];
        const r = cdiv([es[0] - ee[0], es[1] - ee[1]], sum);
        const sum2 = sum[0] * sum[0] + sum[1] * sum[1];
        back.r2[j * 2 + pol] = r[0] * r[0] + r[1] * r[1];
        back.t2[j * 2 + pol] = (4 * es[0] * ee[0]) / sum2;
      }
    }
    if (back && stack.incoherentBack) {
      const thicknessMm = stack.incoherentBack.thicknessMm ?? 0;
      back.attenuation[j] = Math.exp(-2 * k0 * sub.q[1] * thicknessMm * 1e6);
    }
    for (let m = 0; m < middle.length; m++) {
      const t = layerTerms[topEnd + m];
      const o = j * MIDDLE_STRIDE;
      const terms = middle[m].terms;
      put(terms, o, [t.phase, t.eta[0], cdiv([1, 0], t.eta[0]), t.eta[1], cdiv([1, 0], t.eta[1])]);
      if (!middle[m].isFilm) {
        const d = t.thicknessNm as number;
        const { cos, sin } = ccosSin([t.phase[0] * d, Math.min(t.phase[1] * d, MAX_DECAY)]);
        put(terms, o + 10, [cos, sin]);
      }
    }
  }
  return { wavelengthCount: W, eta0, etaSub, topMatrix, bottomVector, topReverseVector, bottomReverseMatrix, middle, back };
}
