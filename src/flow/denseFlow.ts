/**
 * Dense optical flow between two thickness maps: pyramidal, iterated Lucas–Kanade (Lucas &
 * Kanade 1981; coarse-to-fine with warping as in Bouguet 2000) in Gaussian windows, with one
 * extra unknown per window: an additive thickness change.
 *
 * Model, per window around each pixel: h₂(x + d) = h₁(x) + c, with d = (u, v) the displacement
 * (px per frame) and c the thickness the film gained along the way (nm per frame; negative when
 * it thins). Thickness is carried by the liquid (advection) while the film drains, and drainage
 * is slow in space compared with the texture we track, so c is taken constant over a window; d is
 * too (the window is small against the flow's curvature). Linearised about the current estimate
 * and solved by weighted least squares; the constant is eliminated (Schur complement), which is
 * the same as Lucas–Kanade on window-mean-removed gradients and differences.
 *
 * Per pixel we report the standard error of d from the fit (residual variance over the window,
 * floored at `noiseFloorNm`, against the weakest gradient direction of the structure tensor),
 * and a confidence 1 / (1 + (se / 0.3 px)²): near 1 where the thickness has texture in two
 * directions, near 0 where it is featureless or has an edge only (aperture problem). Pixels
 * without a thickness in the first frame, whose displaced position has none in the second, or
 * whose window has too few values get NaN.
 *
 * A forward–backward check (the flow back from the second grid, composed with the first) removes
 * vectors that do not return to their start: occluded or unmatched film, and false matches.
 *
 * All work is on Float32Array grids; scratch buffers are allocated per level, never per pixel.
 */
import { convolveSeparable, gaussianKernel, blurWithHoles } from './gaussianBlur.js';
import { checkGrid, type Grid } from './grid.js';
import { buildPyramid } from './pyramid.js';

export interface DenseFlowOptions {
  /** σ of the Gaussian window at every level, px; default 4. */
  readonly windowSigmaPx?: number;
  /** Most pyramid levels (1 = no pyramid); default 6. */
  readonly maxLevels?: number;
  /** Smallest side of the coarsest level, px; default 12. */
  readonly minSidePx?: number;
  /** Gauss–Newton iterations per level; default 5. */
  readonly iterations?: number;
  /** Estimate an additive thickness change per window (thinning); default true. */
  readonly thinning?: boolean;
  /**
   * Forward–backward check: also compute the flow from the second grid to the first and mark as
   * unknown every vector whose round trip misses its start by more than
   * `consistencyPx` + 5 % of its length (occlusions, film leaving the view, false matches;
   * Sundaram, Brox & Keutzer 2010). Default 0.5 px; null turns the check off.
   */
  readonly consistencyPx?: number | null;
  /** Floor of the thickness residual's standard deviation, nm; default 1. */
  readonly noiseFloorNm?: number;
  /** Stop early (checked once per level). */
  readonly signal?: AbortSignal;
}

export interface DenseFlowResult {
  readonly width: number;
  readonly height: number;
  /** Displacement along x (right), px per frame; NaN where unknown. */
  readonly uPx: Float32Array;
  /** Displacement along y (down, the image's rows), px per frame; NaN where unknown. */
  readonly vPx: Float32Array;
  /** Thickness change following the motion, h₂(x + d) − h₁(x), nm per frame; NaN where unknown. */
  readonly changeNm: Float32Array;
  /** Standard error of the displacement along its least-determined direction, px; NaN where unknown. */
  readonly standardErrorPx: Float32Array;
  /** 1 / (1 + (se / 0.3 px)²), 0 where unknown. */
  readonly confidence: Float32Array;
  /** Pyramid levels used. */
  readonly levels: number;
  /** Vectors the forward–backward check removed. */
  readonly inconsistent: number;
}

/** The standard error at which the confidence is one half, px. */
export const CONFIDENCE_HALF_SE_PX = 0.3;

/** Minimum share of a window that must hold values (sum of its Gaussian weights). */
const MIN_WINDOW_WEIGHT = 0.3;

/** Central-difference gradients; NaN where a neighbour needed is unknown (one-sided at the border). */
function gradients(g: Grid): { gx: Float32Array; gy: Float32Array } {
  const { data, width, height } = g;
  const gx = new Float32Array(data.length);
  const gy = new Float32Array(data.length);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const l = x > 0 ? data[i - 1] : data[i];
      const r = x < width - 1 ? data[i + 1] : data[i];
      const t = y > 0 ? data[i - width] : data[i];
      const b = y < height - 1 ? data[i + width] : data[i];
      const sx = x > 0 && x < width - 1 ? 0.5 : 1;
      const sy = y > 0 && y < height - 1 ? 0.5 : 1;
      gx[i] = width > 1 ? (r - l) * sx : 0;
      gy[i] = height > 1 ? (b - t) * sy : 0;
    }
  }
  return { gx, gy };
}

/** Twice the flow of the coarser level, sampled bilinearly at this level's cells. */
function upsample(coarse: Float32Array, cw: number, ch: number, out: Float32Array, w: number, h: number): void {
  for (let y = 0; y < h; y++) {
    const cy = Math.min(ch - 1, Math.max(0, (y - 0.5) / 2));
    const y0 = Math.min(ch - 2, Math.floor(cy));
    const fy = ch > 1 ? cy - Math.max(0, y0) : 0;
    const ya = Math.max(0, y0);
    const yb = Math.min(ch - 1, ya + 1);
    for (let x = 0; x < w; x++) {
      const cx = Math.min(cw - 1, Math.max(0, (x - 0.5) / 2));
      const x0 = Math.min(cw - 2, Math.floor(cx));
      const fx = cw > 1 ? cx - Math.max(0, x0) : 0;
      const xa = Math.max(0, x0);
      const xb = Math.min(cw - 1, xa + 1);
      const top = coarse[ya * cw + xa] * (1 - fx) + coarse[ya * cw + xb] * fx;
      const bottom = coarse[yb * cw + xa] * (1 - fx) + coarse[yb * cw + xb] * fx;
      out[y * w + x] = 2 * (top * (1 - fy) + bottom * fy);
    }
  }
}

/** Replaces unknown (NaN) flow by a smooth fill from known neighbours, else 0, so warping stays defined. */
function fillUnknown(field: Float32Array, w: number, h: number): void {
  let unknown = 0;
  for (let i = 0; i < field.length; i++) if (!Number.isFinite(field[i])) unknown++;
  if (unknown === 0) return;
  const filled = blurWithHoles(field, w, h, 4, 1e-3).values;
  for (let i = 0; i < field.length; i++) {
    if (!Number.isFinite(field[i])) field[i] = Number.isFinite(filled[i]) ? filled[i] : 0;
  }
}

const SUMS = 10; // xx, xy, yy, x, y, 1, xt, yt, t, tt

interface LevelOutput {
  readonly known: Uint8Array;
  readonly change: Float32Array;
  readonly se: Float32Array;
}

/** Gauss–Newton refinement of (u, v) on one level, in place. */
function refineLevel(
  level1: Grid, level2: Grid, u: Float32Array, v: Float32Array,
  windowSigmaPx: number, iterations: number, thinning: boolean, noiseFloorNm: number, final: boolean,
): LevelOutput {
  const { width: w, height: h } = level1;
  const n = w * h;
  const I1 = level1.data;
  const I2 = level2.data;
  const g1 = gradients(level1);
  const g2 = gradients(level2);
  const taps = gaussianKernel(windowSigmaPx);
  const products: Float32Array[] = [];
  const sums: Float32Array[] = [];
  for (let k = 0; k < SUMS; k++) {
    products.push(new Float32Array(n));
    sums.push(new Float32Array(n));
  }
  const scratch = new Float32Array(n);
  const [pxx, pxy, pyy, px, py, p1, pxt, pyt, pt, ptt] = products;
  const [sxx, sxy, syy, sx, sy, s1, sxt, syt, st, stt] = sums;
  const known = new Uint8Array(n);
  const change = new Float32Array(n);
  const se = new Float32Array(n);
  const maxStep = windowSigmaPx;
  const effectiveCount = 4 * Math.PI * windowSigmaPx * windowSigmaPx;
  // The last pass (iterations + 1) only measures: residual, thinning, standard error.
  for (let it = 0; it <= iterations; it++) {
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        const i = y * w + x;
        const X = x + u[i];
        const Y = y + v[i];
        const a = I1[i];
        let ok = Number.isFinite(a) && Number.isFinite(g1.gx[i]) && Number.isFinite(g1.gy[i]) && X >= 0 && Y >= 0 && X <= w - 1 && Y <= h - 1;
        let b = 0;
        let bx = 0;
        let by = 0;
        if (ok) {
          const x0 = Math.min(w - 2, Math.floor(X));
          const y0 = Math.min(h - 2, Math.floor(Y));
          const xa = Math.max(0, x0);
          const ya = Math.max(0, y0);
          const xb = Math.min(w - 1, xa + 1);
          const yb = Math.min(h - 1, ya + 1);
          const fx = X - xa;
          const fy = Y - ya;
          const i00 = ya * w + xa;
          const i01 = ya * w + xb;
          const i10 = yb * w + xa;
          const i11 = yb * w + xb;
          const w00 = (1 - fx) * (1 - fy);
          const w01 = fx * (1 - fy);
          const w10 = (1 - fx) * fy;
          const w11 = fx * fy;
          b = I2[i00] * w00 + I2[i01] * w01 + I2[i10] * w10 + I2[i11] * w11;
          bx = g2.gx[i00] * w00 + g2.gx[i01] * w01 + g2.gx[i10] * w10 + g2.gx[i11] * w11;
          by = g2.gy[i00] * w00 + g2.gy[i01] * w01 + g2.gy[i10] * w10 + g2.gy[i11] * w11;
          ok = Number.isFinite(b) && Number.isFinite(bx) && Number.isFinite(by);
        }
        if (!ok) {
          pxx[i] = 0; pxy[i] = 0; pyy[i] = 0; px[i] = 0; py[i] = 0; p1[i] = 0; pxt[i] = 0; pyt[i] = 0; pt[i] = 0; ptt[i] = 0;
          continue;
        }
        const gx = 0.5 * (g1.gx[i] + bx);
        const gy = 0.5 * (g1.gy[i] + by);
        const t = b - a;
        pxx[i] = gx * gx; pxy[i] = gx * gy; pyy[i] = gy * gy; px[i] = gx; py[i] = gy; p1[i] = 1;
        pxt[i] = gx * t; pyt[i] = gy * t; pt[i] = t; ptt[i] = t * t;
      }
    }
    for (let k = 0; k < SUMS; k++) convolveSeparable(products[k], sums[k], scratch, w, h, taps);
    const measure = it === iterations;
    for (let i = 0; i < n; i++) {
      const S1 = s1[i];
      if (!(S1 >= MIN_WINDOW_WEIGHT)) {
        if (measure) known[i] = 0;
        continue;
      }
      let a = sxx[i];
      let b = sxy[i];
      let d = syy[i];
      let ex = sxt[i];
      let ey = syt[i];
      let var0 = stt[i];
      if (thinning) {
        const mx = sx[i];
        const my = sy[i];
        const mt = st[i];
        a -= (mx * mx) / S1;
        b -= (mx * my) / S1;
        d -= (my * my) / S1;
        ex -= (mx * mt) / S1;
        ey -= (my * mt) / S1;
        var0 -= (mt * mt) / S1;
      }
      const half = 0.5 * (a + d);
      const lambdaMin = half - Math.sqrt(0.25 * (a - d) * (a - d) + b * b);
      const det = a * d - b * b;
      if (measure) {
        known[i] = lambdaMin > 0 && det > 0 ? 1 : 0;
        const residualVar = Math.max(var0 / S1, noiseFloorNm * noiseFloorNm);
        se[i] = lambdaMin > 0 ? Math.sqrt(residualVar / (effectiveCount * lambdaMin)) : Infinity;
        change[i] = thinning ? st[i] / S1 : 0;
        continue;
      }
      if (!(det > 1e-12 * (a + d) * (a + d)) || !(lambdaMin > 0)) continue;
      let du = -(d * ex - b * ey) / det;
      let dv = -(a * ey - b * ex) / det;
      const step = Math.hypot(du, dv);
      if (step > maxStep) {
        du *= maxStep / step;
        dv *= maxStep / step;
      }
      u[i] += du;
      v[i] += dv;
    }
  }
  if (!final) {
    // Unknown cells take their neighbours' flow before the next level.
    for (let i = 0; i < n; i++) if (!known[i]) { u[i] = NaN; v[i] = NaN; }
    fillUnknown(u, w, h);
    fillUnknown(v, w, h);
  }
  return { known, change, se };
}

/** Dense flow from `first` to `second` (same size, NaN = no thickness): see the module comment. */
export function denseFlow(first: Grid, second: Grid, options: DenseFlowOptions = {}): DenseFlowResult {
  const consistencyPx = options.consistencyPx === undefined ? 0.5 : options.consistencyPx;
  if (consistencyPx !== null && !(consistencyPx > 0)) throw new RangeError(`consistencyPx must be a number > 0 or null, received ${consistencyPx}`);
  const forward = oneWay(first, second, options);
  if (consistencyPx === null) return forward;
  const backward = oneWay(second, first, options);
  const { width: w, height: h, uPx, vPx } = forward;
  const bu = backward.uPx;
  const bv = backward.vPx;
  let inconsistent = 0;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      const u = uPx[i];
      const v = vPx[i];
      if (!Number.isFinite(u)) continue;
      const X = x + u;
      const Y = y + v;
      let ok = X >= 0 && Y >= 0 && X <= w - 1 && Y <= h - 1;
      if (ok) {
        const xa = Math.min(w - 2, Math.max(0, Math.floor(X)));
        const ya = Math.min(h - 2, Math.max(0, Math.floor(Y)));
        const xb = Math.min(w - 1, xa + 1);
        const yb = Math.min(h - 1, ya + 1);
        const fx = X - xa;
        const fy = Y - ya;
        const w00 = (1 - fx) * (1 - fy);
        const w01 = fx * (1 - fy);
        const w10 = (1 - fx) * fy;
        const w11 = fx * fy;
        const ub = bu[ya * w + xa] * w00 + bu[ya * w + xb] * w01 + bu[yb * w + xa] * w10 + bu[yb * w + xb] * w11;
        const vb = bv[ya * w + xa] * w00 + bv[ya * w + xb] * w01 + bv[yb * w + xa] * w10 + bv[yb * w + xb] * w11;
        ok = Number.isFinite(ub) && Number.isFinite(vb) && Math.hypot(u + ub, v + vb) <= consistencyPx + 0.05 * Math.hypot(u, v);
      }
      if (!ok) {
        uPx[i] = NaN;
        vPx[i] = NaN;
        forward.changeNm[i] = NaN;
        forward.standardErrorPx[i] = NaN;
        forward.confidence[i] = 0;
        inconsistent++;
      }
    }
  }
  return { ...forward, inconsistent };
}

function oneWay(first: Grid, second: Grid, options: DenseFlowOptions): DenseFlowResult {
  checkGrid(first, 'first');
  checkGrid(second, 'second');
  if (first.width !== second.width || first.height !== second.height) {
    throw new RangeError(`the two grids differ in size: ${first.width} × ${first.height} and ${second.width} × ${second.height}`);
  }
  const windowSigmaPx = options.windowSigmaPx ?? 4;
  const maxLevels = options.maxLevels ?? 6;
  const minSidePx = options.minSidePx ?? 12;
  const iterations = options.iterations ?? 5;
  const thinning = options.thinning ?? true;
  const noiseFloorNm = options.noiseFloorNm ?? 1;
  if (!(windowSigmaPx > 0 && windowSigmaPx <= 64)) throw new RangeError(`windowSigmaPx must be > 0 and <= 64, received ${windowSigmaPx}`);
  if (!Number.isInteger(maxLevels) || maxLevels < 1 || maxLevels > 16) throw new RangeError(`maxLevels must be a whole number from 1 to 16, received ${maxLevels}`);
  if (!Number.isInteger(iterations) || iterations < 1 || iterations > 100) throw new RangeError(`iterations must be a whole number from 1 to 100, received ${iterations}`);
  if (!(noiseFloorNm >= 0)) throw new RangeError(`noiseFloorNm must be >= 0, received ${noiseFloorNm}`);
  const p1 = buildPyramid(first, maxLevels, minSidePx);
  const p2 = buildPyramid(second, p1.length, minSidePx);
  const top = p1.length - 1;
  let u = new Float32Array(p1[top].width * p1[top].height);
  let v = new Float32Array(u.length);
  let out: LevelOutput | null = null;
  for (let l = top; l >= 0; l--) {
    options.signal?.throwIfAborted();
    if (l < top) {
      const { width: cw, height: ch } = p1[l + 1];
      const { width: w, height: hh } = p1[l];
      const nu = new Float32Array(w * hh);
      const nv = new Float32Array(w * hh);
      upsample(u, cw, ch, nu, w, hh);
      upsample(v, cw, ch, nv, w, hh);
      u = nu;
      v = nv;
    }
    out = refineLevel(p1[l], p2[l], u, v, windowSigmaPx, iterations, thinning, noiseFloorNm, l === 0);
  }
  const { width, height } = first;
  const n = width * height;
  const confidence = new Float32Array(n);
  const standardErrorPx = new Float32Array(n);
  const changeNm = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    if (out!.known[i] && Number.isFinite(first.data[i])) {
      const s = out!.se[i];
      standardErrorPx[i] = s;
      confidence[i] = 1 / (1 + (s / CONFIDENCE_HALF_SE_PX) ** 2);
      changeNm[i] = out!.change[i];
    } else {
      u[i] = NaN;
      v[i] = NaN;
      standardErrorPx[i] = NaN;
      changeNm[i] = NaN;
      confidence[i] = 0;
    }
  }
  return { width, height, uPx: u, vPx: v, changeNm, standardErrorPx, confidence, levels: p1.length, inconsistent: 0 };
}
