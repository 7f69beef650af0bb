/**
 * The full-resolution pass of the mapper (step 4 of mapPixels): every measurable pixel is
 * matched against the predicted table, starting from the order the cell grid resolved, and
 * then scored.
 *
 * matchPixelRows(): per pixel, the reference position is read (bilinear between cell centres,
 * with per-column and per-row weights computed once), the colour is walked downhill from it to
 * the basin's minimum and refined to a sub-step position (matchColour.ts); the pixel keeps that
 * candidate when it continues the field, else it gets no estimate. Its colour cost (in the
 * matching space) and the cost of the best other order are kept for scoring.
 *
 * scorePixelRows(): turns cost and margin into a confidence once the photo's median cost is
 * known, and marks poor matches (keepConsistent.ts then keeps or drops them).
 *
 * Both work on a band of rows [y0, y1) so that bands can be processed independently; neither
 * allocates per pixel. For 8-bit photos the other-order search (two downhill walks from the
 * colour cube's candidates, which depend on the colour alone) is remembered per exact colour
 * (AlternativeMemo), so each distinct colour pays for it once.
 */
import type { CandidateCube } from './candidateCube.js';
import { buildCell, cellOf, distanceAt } from './candidateCube.js';
import { type MatchScratch, refinePosition, walkDownhill } from './matchColour.js';
import { type NoiseProfile, NOISE_BINS } from './estimateNoise.js';
import type { MatchSpace } from './matchSpace.js';
import { PixelStatus } from './types.js';

export interface PixelPassInput {
  /** Encoded RGB, 0..1, interleaved. */
  readonly rgb: Float32Array;
  readonly width: number;
  readonly height: number;
  /** Per-pixel status; pixels that lose their estimate are set to ambiguous or tooThick. */
  readonly status: Uint8Array;
  /** Resolved table position per grid cell (NaN = unresolved). */
  readonly gridPosition: Float32Array;
  readonly block: number;
  readonly gridWidth: number;
  readonly gridHeight: number;
  /** Predicted encoded colours, count × 3. */
  readonly predictedRgb: Float32Array;
  readonly count: number;
  readonly cube: CandidateCube;
  /** Matching space for the colour cost (null = encoded RGB). */
  readonly space: MatchSpace | null;
  /** Largest step from the reference, table steps. */
  readonly pixelJump: number;
  readonly washoutIndex: number;
  /** Thickness of table position 0 and the table step, nm. */
  readonly startNm: number;
  readonly stepNm: number;
  /** Remembers the other-order search per exact 8-bit colour (null: 16-bit photos). */
  readonly memo: AlternativeMemo | null;
}

export interface PixelPassOutput {
  /** Thickness of each kept pixel, nm (left as it was elsewhere: the caller fills it with NaN). */
  readonly thicknessNm: Float32Array;
  /** Colour cost of each kept pixel (matching space). */
  readonly cost: Float32Array;
  /** Cost of the best other order (Infinity when none). */
  readonly alternativeCost: Float32Array;
}

export interface PixelPassCounts {
  unresolved: number;
  discontinuous: number;
}

/**
 * For each exact 8-bit colour, the table indices reached by walking downhill from its cube
 * cell's two best candidates (−1 = none). Stored in pages of 8×8×8 colours, allocated when a
 * page is first used, so memory follows the photo's colour gamut (2 KiB per page used).
 */
export interface AlternativeMemo {
  /** Page number per (r>>3, g>>3, b>>3); −1 = not allocated. */
  readonly pageOf: Int32Array;
  pool: Int16Array;
  pages: number;
}

const PAGE_COLOURS = 512;
const NOT_COMPUTED = -2;

export function createAlternativeMemo(count: number): AlternativeMemo | null {
  if (count > 32767) return null;
  return { pageOf: new Int32Array(32 * 32 * 32).fill(-1), pool: new Int16Array(0), pages: 0 };
}

function memoSlot(memo: AlternativeMemo, r8: number, g8: number, b8: number): number {
  const page = ((r8 >> 3) << 10) | ((g8 >> 3) << 5) | (b8 >> 3);
  let p = memo.pageOf[page];
  if (p < 0) {
    p = memo.pages++;
    const needed = memo.pages * PAGE_COLOURS * 2;
    if (needed > memo.pool.length) {
      const grown = new Int16Array(Math.max(needed, memo.pool.length * 2));
      grown.set(memo.pool);
      grown.fill(NOT_COMPUTED, memo.pool.length);
      memo.pool = grown;
    }
    memo.pageOf[page] = p;
  }
  return (p * PAGE_COLOURS + (((r8 & 7) << 6) | ((g8 & 7) << 3) | (b8 & 7))) * 2;
}

/** Column (or row) interpolation weights between cell centres, computed once per band. */
interface Axis {
  readonly lo: Int32Array;
  readonly hi: Int32Array;
  readonly t: Float64Array;
  readonly own: Int32Array;
}

function axis(length: number, block: number, cells: number): Axis {
  const lo = new Int32Array(length);
  const hi = new Int32Array(length);
  const t = new Float64Array(length);
  const own = new Int32Array(length);
  for (let x = 0; x < length; x++) {
    const f = (x + 0.5) / block - 0.5;
    const x0 = Math.max(0, Math.min(cells - 1, Math.floor(f)));
    lo[x] = x0;
    hi[x] = Math.min(cells - 1, x0 + 1);
    t[x] = Math.max(0, Math.min(1, f - x0));
    own[x] = Math.floor(x / block);
  }
  return { lo, hi, t, own };
}

/**
 * Matches rows [y0, y1). Writes position/cost/alternativeCost for kept pixels and updates
 * status for the others; returns why pixels were dropped.
 */
export function matchPixelRows(input: PixelPassInput, out: PixelPassOutput, scratch: MatchScratch, y0: number, y1: number): PixelPassCounts {
  const { rgb, width, status, gridPosition, block, gridWidth, gridHeight, predictedRgb, count, cube, space, pixelJump, washoutIndex, memo, startNm, stepNm } = input;
  const counts: PixelPassCounts = { unresolved: 0, discontinuous: 0 };
  const columns = block === 1 ? null : axis(width, block, gridWidth);
  const rows = block === 1 ? null : axis(input.height, block, gridHeight);
  const m = space ? space.matrix : null;
  const levels = cube.levels;
  const perCell = cube.perCell;
  for (let y = y0; y < y1; y++) {
    const rowLo = rows ? rows.lo[y] * gridWidth : 0;
    const rowHi = rows ? rows.hi[y] * gridWidth : 0;
    const ty = rows ? rows.t[y] : 0;
    const rowOwn = rows ? rows.own[y] * gridWidth : 0;
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (status[i] !== PixelStatus.ok) continue;
      let reference: number;
      if (columns) {
        const x0 = columns.lo[x];
        const x1 = columns.hi[x];
        const tx = columns.t[x];
        const top = (1 - tx) * gridPosition[rowLo + x0] + tx * gridPosition[rowLo + x1];
        const bottom = (1 - tx) * gridPosition[rowHi + x0] + tx * gridPosition[rowHi + x1];
        reference = (1 - ty) * top + ty * bottom;
        if (reference !== reference) reference = gridPosition[rowOwn + columns.own[x]];
      } else reference = gridPosition[i];
      if (reference !== reference) {
        status[i] = PixelStatus.ambiguous;
        counts.unresolved++;
        continue;
      }
      const r = rgb[i * 3];
      const g = rgb[i * 3 + 1];
      const b = rgb[i * 3 + 2];
      // The candidate that continues the field: the basin the reference points into.
      let start = Math.round(reference);
      if (start < 0) start = 0;
      else if (start >= count) start = count - 1;
      const minimum = walkDownhill(predictedRgb, count, r, g, b, start);
      const position = refinePosition(predictedRgb, count, r, g, b, minimum, scratch.cost, 0);
      const rgbCost = scratch.cost[0];
      if (Math.abs(position - reference) > pixelJump) {
        status[i] = PixelStatus.ambiguous;
        counts.discontinuous++;
        continue;
      }
      if (position >= washoutIndex) {
        status[i] = PixelStatus.tooThick;
        continue;
      }
      // The best candidate of another order among the cube's two best (for the margin).
      const cell = cellOf(levels, r, g, b);
      if (!cube.built[cell]) buildCell(cube, cell, predictedRgb, count, scratch.cubeCost);
      const base = cell * perCell;
      let slot = -1;
      if (memo) {
        const r8 = Math.round(r * 255);
        const g8 = Math.round(g * 255);
        const b8 = Math.round(b * 255);
        if (Math.abs(r * 255 - r8) < 1e-3 && Math.abs(g * 255 - g8) < 1e-3 && Math.abs(b * 255 - b8) < 1e-3) slot = memoSlot(memo, r8, g8, b8);
      }
      let alternative = Infinity;
      for (let k = 0; k < 2 && k < perCell; k++) {
        const candidate = cube.candidates[base + k];
        if (candidate < 0) break;
        if (Math.abs(candidate - position) <= pixelJump) continue;
        let other: number;
        if (slot >= 0) {
          other = memo!.pool[slot + k];
          if (other === NOT_COMPUTED) {
            other = walkDownhill(predictedRgb, count, r, g, b, candidate);
            memo!.pool[slot + k] = other;
          }
        } else other = walkDownhill(predictedRgb, count, r, g, b, candidate);
        if (Math.abs(other - position) <= pixelJump) continue;
        const otherCost = distanceAt(predictedRgb, other, r, g, b);
        if (otherCost < alternative) alternative = otherCost;
      }
      // How well it fits: in the matching space (chroma down-weighted for subsampled JPEGs),
      // i.e. |M·(fitted − pixel)|², the offset cancelling.
      let cost = rgbCost;
      if (m) {
        const f = position < 0 ? 0 : position >= count - 1 ? count - 2 : Math.floor(position);
        const w = position - f;
        const a = f * 3;
        const dr = predictedRgb[a] + w * (predictedRgb[a + 3] - predictedRgb[a]) - r;
        const dg = predictedRgb[a + 1] + w * (predictedRgb[a + 4] - predictedRgb[a + 1]) - g;
        const db = predictedRgb[a + 2] + w * (predictedRgb[a + 5] - predictedRgb[a + 2]) - b;
        const e0 = m[0] * dr + m[1] * dg + m[2] * db;
        const e1 = m[3] * dr + m[4] * dg + m[5] * db;
        const e2 = m[6] * dr + m[7] * dg + m[8] * db;
        cost = e0 * e0 + e1 * e1 + e2 * e2;
      }
      out.thicknessNm[i] = startNm + position * stepNm;
      out.cost[i] = cost;
      // Margin to the next-best order (encoded RGB), carried over to the matching-space cost.
      out.alternativeCost[i] = alternative === Infinity ? Infinity : cost + (alternative - rgbCost);
    }
  }
  return counts;
}

export interface ScoreInput {
  readonly rgb: Float32Array;
  readonly width: number;
  readonly status: Uint8Array;
  readonly noise: NoiseProfile;
  /** Median colour cost over kept pixels. */
  readonly medianCost: number;
  /** Allowance for model error on top of the noise (squared encoded units). */
  readonly modelSlack: number;
}

/**
 * Scores rows [y0, y1): the confidence is exp(−cost / (4·noise cost + slack)) ×
 * (1 − exp(−margin / noise cost)), replacing the colour cost in `out.cost`. A match is poor when
 * its cost exceeds both the noise-based limit and 9× the median cost (≈ the 99.99th percentile
 * of a χ² with 3 degrees of freedom, relative to its median; common practice for outliers): it
 * is marked ambiguous but keeps its estimate for keepConsistentPixels(). Returns the number of
 * poor matches.
 */
export function scorePixelRows(input: ScoreInput, out: PixelPassOutput, y0: number, y1: number): number {
  const { rgb, width, status, noise, medianCost, modelSlack } = input;
  const sigmaByLuma = noise.sigmaByLuma;
  const floorCost = medianCost / 2.37;
  const poorMedian = 9 * medianCost;
  let poor = 0;
  for (let i = y0 * width, end = y1 * width; i < end; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    const cost = out.cost[i];
    const luma = 0.2126 * rgb[i * 3] + 0.7152 * rgb[i * 3 + 1] + 0.0722 * rgb[i * 3 + 2];
    let bin = Math.floor(luma * NOISE_BINS);
    bin = bin < 0 ? 0 : bin > NOISE_BINS - 1 ? NOISE_BINS - 1 : bin;
    const sigma = sigmaByLuma[bin];
    const noiseCost = 3 * sigma * sigma;
    const pixelNoiseCost = noiseCost > floorCost ? noiseCost : floorCost;
    const limit = 10 * pixelNoiseCost + modelSlack;
    // A poor match loses its status but keeps its estimate and confidence for a second look
    // (keepConsistent.ts), which drops or keeps it.
    if (cost > (limit > poorMedian ? limit : poorMedian)) {
      status[i] = PixelStatus.ambiguous;
      poor++;
    }
    const alternative = out.alternativeCost[i];
    const fitTerm = Math.exp(-cost / (4 * pixelNoiseCost + modelSlack));
    // 1 − e^(−u) rounds to exactly 1 in double precision for u > 37 (e^(−37) < 2^(−53)).
    const u = alternative === Infinity ? Infinity : (alternative - cost) / pixelNoiseCost;
    const marginTerm = u > 37 ? 1 : 1 - Math.exp(-(u > 0 ? u : 0));
    out.cost[i] = fitTerm * marginTerm;
  }
  return poor;
}
