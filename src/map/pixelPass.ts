/**
 * The full-resolution pass of the mapper (step 4 of mapPixels): every measurable pixel is
 * matched against the predicted table, starting from the order the cell grid resolved, and
 * then scored.
 *
 * matchPixelRows(): per pixel, the reference position is read (bilinear between cell centres,
 * with per-column and per-row weights computed once, a row at a time), the colour is walked
 * downhill from it to the basin's minimum and refined to a sub-step position (matchColour.ts);
 * the pixel keeps that candidate when it continues the field, else it gets no estimate. Its
 * colour cost (in the matching space) and the cost of the best other order are kept for scoring.
 *
 * scorePixelRows(): turns cost and margin into a confidence once the photo's median cost is
 * known, and marks poor matches (keepConsistent.ts then keeps or drops them).
 *
 * Both work on a band of rows [y0, y1) so that bands can be processed independently; neither
 * allocates per pixel. A 12-MP photo holds only some 100,000 distinct 8-bit colours, so for
 * 8-bit photos each distinct colour is answered once (ColourMemo): the basin its walk reached
 * (the interval of starts known to lead to the same minimum), the refined position and
 * thickness, both costs, the margin and the other-order walks; a pixel whose start falls in
 * the basin only checks the jump and the washout limit and copies the numbers. Scoring reuses
 * the confidence of an earlier pixel with the same noise bin, cost and margin. The memo and the
 * cache change no number: the map is byte-identical to the pass without them
 * (tests/map-colour-memo.test.ts), whatever the number of threads (each thread keeps its own).
 * The work is split into small functions: V8 optimises them far better than one long
 * multi-loop function.
 */
import type { CandidateCube } from './candidateCube.js';
import { buildCell, cellOf, distanceAt } from './candidateCube.js';
import { MAX_WALK, type MatchScratch, refinePosition, walkDownhill } from './matchColour.js';
import { type NoiseProfile, NOISE_BINS } from './estimateNoise.js';
import type { MatchSpace } from './matchSpace.js';
import { PixelStatus } from './types.js';
import { type PhotoPixels, valueAt } from './photoPixels.js';

export interface PixelPassInput {
  /** The photo's encoded RGB (./photoPixels.ts). */
  readonly rgb: PhotoPixels;
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
  /** Remembers each exact 8-bit colour's match (null: 16-bit photos, or to compute every pixel afresh). */
  readonly memo: ColourMemo | null;
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
 * What the pixel pass remembers per exact 8-bit colour, for one pass (one predicted table,
 * matching space and jump). Everything a pixel's match computes apart from its reference
 * position depends on its colour and on the minimum its downhill walk reaches, and the walk is
 * deterministic and memoryless (it moves one way only, one index per step): every start between
 * the start s and the minimum m walks to m too, provided the walk stopped at a true local
 * minimum, i.e. in fewer than MAX_WALK steps. So each colour keeps one basin: the interval
 * [lo, hi] of starts known to reach m, m itself, the refined position and thickness, the RGB and
 * matching-space costs, and the margin output (computed when a pixel first needs it); a pixel
 * whose start falls in the interval takes them, any other walks as before and then widens the
 * interval (same m) or replaces the basin (another m). The colour also keeps the minima reached
 * from its cube cell's two best candidates (the other-order search, −2 = not yet walked), which
 * depend on the colour alone. The results are the same numbers as without the memo.
 *
 * Memory follows the photo's colour gamut: colours are looked up in pages of 8×8×8 colours, each
 * page (2 KiB, an Int32 entry number per colour) allocated when first used, and each colour met
 * gets an entry of 5 × Int32 + 5 × Float64 = 60 bytes; both pools grow by doubling, so up to
 * twice that is allocated. The 12-MP demo photo (97,255 distinct colours in 4,735 pages) uses
 * 9.2 MiB of pages and 5.6 MiB of entries, 24 MiB allocated, per thread.
 */
export interface ColourMemo {
  /** Page number per (r>>3, g>>3, b>>3); −1 = not allocated. */
  readonly pageOf: Int32Array;
  /** Entry number per colour of the allocated pages; −1 = none yet. */
  slots: Int32Array;
  pages: number;
  /** Per entry: lo, hi, minimum (−1 = no basin yet), other-order minima of candidates 0 and 1. */
  ints: Int32Array;
  /** Per entry: position, thickness (nm), RGB cost, matching-space cost, margin output (NaN = not yet). */
  reals: Float64Array;
  entries: number;
  /** The Float32 value each 8-bit level has in this photo, learnt on first sight (NaN = not seen). */
  readonly level: Float32Array;
}

const PAGE_COLOURS = 512;
const INTS = 5;
const REALS = 5;
const NOT_COMPUTED = -2;

/**
 * The buffers of the last memo released on this thread (releaseColourMemo), taken up by the next
 * memo: a series maps frame after frame, and a fresh memo's pages cost more to allocate, zero
 * and fill than the pass spends using many of them (measured: about 20 ms of a 320×240 frame's
 * 0.6 s). Kept clean on release: every page unallocated, every slot −1.
 */
let spare: { pageOf: Int32Array; slots: Int32Array; ints: Int32Array; reals: Float64Array } | null = null;

/** A memo for a pass over `count` table entries (null when indices do not fit its pools). */
export function createColourMemo(count: number): ColourMemo | null {
  if (count > 0x3fffffff) return null;
  const buffers = spare;
  spare = null;
  // One literal, in the interface's order, whichever buffers it takes: memos of one shape keep
  // the pass's optimised code (a second shape deoptimised it, "wrong map").
  return {
    pageOf: buffers ? buffers.pageOf : new Int32Array(32 * 32 * 32).fill(-1),
    slots: buffers ? buffers.slots : new Int32Array(0),
    pages: 0,
    ints: buffers ? buffers.ints : new Int32Array(0),
    reals: buffers ? buffers.reals : new Float64Array(0),
    entries: 0,
    level: new Float32Array(256).fill(NaN),
  };
}

/**
 * Hands a memo's buffers back for the next memo on this thread; `memo` must not be used again.
 * Only the pages it allocated are cleared (not the whole pool).
 */
export function releaseColourMemo(memo: ColourMemo | null): void {
  if (memo === null) return;
  const { pageOf, slots } = memo;
  for (let page = 0; page < pageOf.length; page++) pageOf[page] = -1;
  slots.fill(-1, 0, memo.pages * PAGE_COLOURS);
  memo.pages = 0;
  memo.entries = 0;
  spare = { pageOf, slots, ints: memo.ints, reals: memo.reals };
}

/** The 8-bit level of `value` when it is exactly this photo's value of that level, else −1. */
function levelOf(memo: ColourMemo, value: number): number {
  const k = Math.round(value * 255);
  if (!(k >= 0 && k <= 255)) return -1; // NaN too
  if (memo.level[k] === value) return k;
  return learnLevel(memo, value, k);
}

/** First sight of level k: a value within 1e-3 code values of k/255 becomes the level's value. */
function learnLevel(memo: ColourMemo, value: number, k: number): number {
  if (memo.level[k] === memo.level[k] || Math.abs(value * 255 - k) >= 1e-3) return -1;
  memo.level[k] = value;
  return k;
}

/** The entry of colour (r8, g8, b8), created (with no basin yet) when first met. */
function entryOf(memo: ColourMemo, r8: number, g8: number, b8: number): number {
  const page = ((r8 >> 3) << 10) | ((g8 >> 3) << 5) | (b8 >> 3);
  let p = memo.pageOf[page];
  if (p < 0) p = addPage(memo, page);
  const slot = p * PAGE_COLOURS + (((r8 & 7) << 6) | ((g8 & 7) << 3) | (b8 & 7));
  const e = memo.slots[slot];
  return e >= 0 ? e : addEntry(memo, slot);
}

function addPage(memo: ColourMemo, page: number): number {
  const p = memo.pages++;
  const needed = memo.pages * PAGE_COLOURS;
  if (needed > memo.slots.length) {
    const grown = new Int32Array(Math.max(needed, memo.slots.length * 2));
    grown.set(memo.slots);
    grown.fill(-1, memo.slots.length);
    memo.slots = grown;
  }
  memo.pageOf[page] = p;
  return p;
}

function addEntry(memo: ColourMemo, slot: number): number {
  const e = memo.entries++;
  if (memo.entries * INTS > memo.ints.length) {
    const size = Math.max(1024, memo.entries * 2);
    const ints = new Int32Array(size * INTS);
    ints.set(memo.ints);
    memo.ints = ints;
    const reals = new Float64Array(size * REALS);
    reals.set(memo.reals);
    memo.reals = reals;
  }
  const o = e * INTS;
  memo.ints[o] = 1;
  memo.ints[o + 1] = 0;
  memo.ints[o + 2] = -1;
  memo.ints[o + 3] = NOT_COMPUTED;
  memo.ints[o + 4] = NOT_COMPUTED;
  memo.slots[slot] = e;
  return e;
}

/**
 * The pixel pass's input as one object literal, in one order, for the calling thread and the
 * helper threads alike (not a spread: a spread made a differently shaped object for every photo,
 * and the pass's compiled code was thrown away, "wrong map", and compiled again each time).
 */
export function pixelPassInput(common: Omit<PixelPassInput, 'cube' | 'memo'>, cube: CandidateCube, memo: ColourMemo | null): PixelPassInput {
  return {
    rgb: common.rgb,
    width: common.width,
    height: common.height,
    status: common.status,
    gridPosition: common.gridPosition,
    block: common.block,
    gridWidth: common.gridWidth,
    gridHeight: common.gridHeight,
    predictedRgb: common.predictedRgb,
    count: common.count,
    cube,
    space: common.space,
    pixelJump: common.pixelJump,
    washoutIndex: common.washoutIndex,
    startNm: common.startNm,
    stepNm: common.stepNm,
    memo,
  };
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

/** What one pixel's match ended in. */
const KEPT = 0;
const UNRESOLVED = 1;
const DISCONTINUOUS = 2;
const TOO_THICK = 3;

/** One band's view of the pass: the input, the outputs and the scratch values of the pixel at hand. */
interface Pass {
  readonly input: PixelPassInput;
  readonly out: PixelPassOutput;
  readonly scratch: MatchScratch;
  readonly memo: ColourMemo | null;
  /** Of the last `solve`: the refined position and its RGB cost. */
  position: number;
  rgbCost: number;
  /** The last colour looked up in the memo (its codes, or its values when held as floats) and its entry (NaN: none yet). */
  lastR: number;
  lastG: number;
  lastB: number;
  lastEntry: number;
}

/**
 * Matches rows [y0, y1). Writes position/cost/alternativeCost for kept pixels and updates
 * status for the others; returns why pixels were dropped.
 */
export function matchPixelRows(input: PixelPassInput, out: PixelPassOutput, scratch: MatchScratch, y0: number, y1: number): PixelPassCounts {
  const counts: PixelPassCounts = { unresolved: 0, discontinuous: 0 };
  const pass: Pass = { input, out, scratch, memo: input.memo, position: NaN, rgbCost: NaN, lastR: NaN, lastG: NaN, lastB: NaN, lastEntry: -1 };
  const { block, width, gridWidth, gridHeight } = input;
  const columns = block === 1 ? null : axis(width, block, gridWidth);
  const rows = block === 1 ? null : axis(input.height, block, gridHeight);
  const reference = new Float64Array(width);
  for (let y = y0; y < y1; y++) {
    const first = y * width;
    if (columns && rows) referenceRow(input, columns, rows, y, reference);
    else for (let x = 0; x < width; x++) reference[x] = input.gridPosition[first + x];
    matchRow(pass, first, reference, counts);
  }
  return counts;
}

/** The reference position of each pixel of row y (bilinear between cell centres; NaN = none). */
function referenceRow(input: PixelPassInput, columns: Axis, rows: Axis, y: number, reference: Float64Array): void {
  const { gridPosition, gridWidth, width } = input;
  const rowLo = rows.lo[y] * gridWidth;
  const rowHi = rows.hi[y] * gridWidth;
  const ty = rows.t[y];
  const rowOwn = rows.own[y] * gridWidth;
  for (let x = 0; x < width; x++) {
    const x0 = columns.lo[x];
    const x1 = columns.hi[x];
    const tx = columns.t[x];
    const top = (1 - tx) * gridPosition[rowLo + x0] + tx * gridPosition[rowLo + x1];
    const bottom = (1 - tx) * gridPosition[rowHi + x0] + tx * gridPosition[rowHi + x1];
    let value = (1 - ty) * top + ty * bottom;
    if (value !== value) value = gridPosition[rowOwn + columns.own[x]];
    reference[x] = value;
  }
}

/**
 * Matches the measurable pixels of one row. The common case (an exact 8-bit colour whose memo
 * entry already holds the basin the pixel's start falls in) is written out here: the functions
 * it calls otherwise take integers only (pixel index, entry, start), since a double passed to a
 * function V8 does not inline is boxed in a fresh heap number, one per pixel.
 */
function matchRow(pass: Pass, first: number, reference: Float64Array, counts: PixelPassCounts): void {
  const input = pass.input;
  const { status, width, rgb, count, pixelJump, washoutIndex } = input;
  const { thicknessNm, cost, alternativeCost } = pass.out;
  const memo = pass.memo;
  const codes = rgb.codes;
  const values = rgb.values;
  for (let x = 0; x < width; x++) {
    const i = first + x;
    if (status[i] !== PixelStatus.ok) continue;
    const position0 = reference[x];
    let outcome = UNRESOLVED;
    if (position0 === position0) {
      // The candidate that continues the field: the basin the reference points into.
      let start = Math.round(position0);
      if (start < 0) start = 0;
      else if (start >= count) start = count - 1;
      let e = -1;
      if (memo !== null) {
        // Neighbouring pixels often share a colour (about 2 in 3 in a 12-MP JPEG): its entry is kept.
        // An 8-bit photo's colour is its codes (a memo is made only for 8-bit codes, never for
        // 16-bit ones); one held as floats is compared by value.
        const k = i * 3;
        if (codes !== null) e = codes[k] === pass.lastR && codes[k + 1] === pass.lastG && codes[k + 2] === pass.lastB ? pass.lastEntry : lookUpCodes(pass, memo, codes as Uint8Array, k);
        else e = values[k] === pass.lastR && values[k + 1] === pass.lastG && values[k + 2] === pass.lastB ? pass.lastEntry : lookUp(pass, memo, values, k);
      }
      if (e >= 0) {
        // A colour with memo entry e: the same numbers, each computed once per colour and basin.
        const o = e * INTS;
        if (start < memo!.ints[o] || start > memo!.ints[o + 1]) rememberBasin(pass, memo!, e, i, start);
        const reals = memo!.reals;
        const q = e * REALS;
        const position = reals[q];
        if (Math.abs(position - position0) > pixelJump) outcome = DISCONTINUOUS;
        else if (position >= washoutIndex) outcome = TOO_THICK;
        else {
          if (reals[q + 4] !== reals[q + 4]) rememberMargin(pass, memo!, e, i);
          thicknessNm[i] = reals[q + 1];
          cost[i] = reals[q + 3];
          alternativeCost[i] = reals[q + 4];
          continue;
        }
      } else outcome = matchAfresh(pass, i, x, reference, start);
    }
    if (outcome === KEPT) continue;
    if (outcome === UNRESOLVED) {
      status[i] = PixelStatus.ambiguous;
      counts.unresolved++;
    } else if (outcome === DISCONTINUOUS) {
      status[i] = PixelStatus.ambiguous;
      counts.discontinuous++;
    } else status[i] = PixelStatus.tooThick;
  }
}

/** The memo entry of the colour at interleaved index k (held as floats), kept as the last colour looked up; −1 when it is not an exact 8-bit colour. */
function lookUp(pass: Pass, memo: ColourMemo, values: Float32Array, k: number): number {
  const r = values[k];
  const g = values[k + 1];
  const b = values[k + 2];
  const r8 = levelOf(memo, r);
  const g8 = r8 < 0 ? -1 : levelOf(memo, g);
  const b8 = g8 < 0 ? -1 : levelOf(memo, b);
  if (b8 < 0) return -1;
  const e = entryOf(memo, r8, g8, b8);
  pass.lastR = r;
  pass.lastG = g;
  pass.lastB = b;
  pass.lastEntry = e;
  return e;
}

/** The memo entry of the colour at interleaved index k of an 8-bit photo's codes, kept as the last colour looked up. */
function lookUpCodes(pass: Pass, memo: ColourMemo, codes: Uint8Array, k: number): number {
  const r8 = codes[k];
  const g8 = codes[k + 1];
  const b8 = codes[k + 2];
  const e = entryOf(memo, r8, g8, b8);
  pass.lastR = r8;
  pass.lastG = g8;
  pass.lastB = b8;
  pass.lastEntry = e;
  return e;
}

/** A pixel's match without the memo: walk, refine, check, other-order search and matching-space cost. */
function matchAfresh(pass: Pass, i: number, x: number, referenceRow: Float64Array, start: number): number {
  const input = pass.input;
  const reference = referenceRow[x];
  const r = valueAt(input.rgb, i * 3);
  const g = valueAt(input.rgb, i * 3 + 1);
  const b = valueAt(input.rgb, i * 3 + 2);
  const position = solve(pass, r, g, b, walkDownhill(input.predictedRgb, input.count, r, g, b, start));
  if (Math.abs(position - reference) > input.pixelJump) return DISCONTINUOUS;
  if (position >= input.washoutIndex) return TOO_THICK;
  const rgbCost = pass.rgbCost;
  const alternative = otherOrderCost(pass, r, g, b, position, -1);
  const cost = matchingCost(input, r, g, b, position, rgbCost);
  pass.out.thicknessNm[i] = input.startNm + position * input.stepNm;
  pass.out.cost[i] = cost;
  // Margin to the next-best order (encoded RGB), carried over to the matching-space cost.
  pass.out.alternativeCost[i] = alternative === Infinity ? Infinity : cost + (alternative - rgbCost);
  return KEPT;
}

/** Refines minimum m of colour (r, g, b): sets pass.position and pass.rgbCost, returns the position. */
function solve(pass: Pass, r: number, g: number, b: number, m: number): number {
  const { predictedRgb, count } = pass.input;
  const position = refinePosition(predictedRgb, count, r, g, b, m, pass.scratch.cost, 0);
  pass.position = position;
  pass.rgbCost = pass.scratch.cost[0];
  return position;
}

/**
 * Walks colour e from `start`; when the walk ends at a true minimum (fewer than MAX_WALK steps)
 * the entry's basin is widened to [start, m] (same minimum) or replaced by it.
 */
function rememberBasin(pass: Pass, memo: ColourMemo, e: number, i: number, start: number): void {
  const { predictedRgb, count, rgb } = pass.input;
  const r = valueAt(rgb, i * 3);
  const g = valueAt(rgb, i * 3 + 1);
  const b = valueAt(rgb, i * 3 + 2);
  const m = walkDownhill(predictedRgb, count, r, g, b, start);
  const lo = start < m ? start : m;
  const hi = start < m ? m : start;
  const o = e * INTS;
  const ints = memo.ints;
  const natural = hi - lo < MAX_WALK;
  if (ints[o + 2] === m) {
    // Same basin: only a natural walk's path is known to reach m (both intervals hold m).
    if (natural && ints[o] > ints[o + 1]) {
      ints[o] = lo;
      ints[o + 1] = hi;
    } else if (natural) {
      if (lo < ints[o]) ints[o] = lo;
      if (hi > ints[o + 1]) ints[o + 1] = hi;
    }
    return;
  }
  const q = e * REALS;
  const reals = memo.reals;
  const position = solve(pass, r, g, b, m);
  reals[q] = position;
  reals[q + 1] = pass.input.startNm + position * pass.input.stepNm;
  reals[q + 2] = pass.rgbCost;
  reals[q + 3] = matchingCost(pass.input, r, g, b, position, pass.rgbCost);
  reals[q + 4] = NaN;
  ints[o + 2] = m;
  // A walk cut short keeps the position for this pixel but teaches no interval (empty [1, 0]).
  ints[o] = natural ? lo : 1;
  ints[o + 1] = natural ? hi : 0;
}

/** The margin output of colour e's basin (see matchRow), computed and kept on first need. */
function rememberMargin(pass: Pass, memo: ColourMemo, e: number, i: number): void {
  const rgb = pass.input.rgb;
  const r = valueAt(rgb, i * 3);
  const g = valueAt(rgb, i * 3 + 1);
  const b = valueAt(rgb, i * 3 + 2);
  const q = e * REALS;
  const alternative = otherOrderCost(pass, r, g, b, memo.reals[q], e * INTS + 3);
  const reals = memo.reals;
  const cost = reals[q + 3];
  const margin = alternative === Infinity ? Infinity : cost + (alternative - reals[q + 2]);
  reals[q + 4] = margin;
}

/**
 * The RGB cost of the best other order among the colour's cube cell's two best candidates
 * (Infinity when none): each candidate more than the jump away from `position` is walked downhill.
 * `others` ≥ 0: the memo's two Int32 slots remembering those walks for this colour.
 */
function otherOrderCost(pass: Pass, r: number, g: number, b: number, position: number, others: number): number {
  const { cube, predictedRgb, count, pixelJump } = pass.input;
  const cell = cellOf(cube.levels, r, g, b);
  if (!cube.built[cell]) buildCell(cube, cell, predictedRgb, count, pass.scratch.cubeCost);
  const base = cell * cube.perCell;
  let alternative = Infinity;
  for (let k = 0; k < 2 && k < cube.perCell; k++) {
    const candidate = cube.candidates[base + k];
    if (candidate < 0) break;
    if (Math.abs(candidate - position) <= pixelJump) continue;
    const other = others >= 0 ? rememberedWalk(pass, pass.memo!, others + k, r, g, b, candidate) : walkDownhill(predictedRgb, count, r, g, b, candidate);
    if (Math.abs(other - position) <= pixelJump) continue;
    const otherCost = distanceAt(predictedRgb, other, r, g, b);
    if (otherCost < alternative) alternative = otherCost;
  }
  return alternative;
}

/** The minimum reached from `candidate`, remembered in memo.ints[slot]. */
function rememberedWalk(pass: Pass, memo: ColourMemo, slot: number, r: number, g: number, b: number, candidate: number): number {
  let other = memo.ints[slot];
  if (other === NOT_COMPUTED) {
    other = walkDownhill(pass.input.predictedRgb, pass.input.count, r, g, b, candidate);
    memo.ints[slot] = other;
  }
  return other;
}

/**
 * How well position fits colour (r, g, b): in the matching space (chroma down-weighted for
 * subsampled JPEGs), i.e. |M·(fitted − pixel)|², the offset cancelling; the RGB cost without one.
 */
function matchingCost(input: PixelPassInput, r: number, g: number, b: number, position: number, rgbCost: number): number {
  const space = input.space;
  if (!space) return rgbCost;
  const m = space.matrix;
  const { predictedRgb, count } = input;
  const f = position < 0 ? 0 : position >= count - 1 ? count - 2 : Math.floor(position);
  const w = position - f;
  const a = f * 3;
  const dr = predictedRgb[a] + w * (predictedRgb[a + 3] - predictedRgb[a]) - r;
  const dg = predictedRgb[a + 1] + w * (predictedRgb[a + 4] - predictedRgb[a + 1]) - g;
  const db = predictedRgb[a + 2] + w * (predictedRgb[a + 5] - predictedRgb[a + 2]) - b;
  const e0 = m[0] * dr + m[1] * dg + m[2] * db;
  const e1 = m[3] * dr + m[4] * dg + m[5] * db;
  const e2 = m[6] * dr + m[7] * dg + m[8] * db;
  return e0 * e0 + e1 * e1 + e2 * e2;
}

export interface ScoreInput {
  readonly rgb: PhotoPixels;
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
 *
 * The confidence depends on the pixel's noise bin (its luma), cost and margin only, so the pixels
 * of one colour and basin share it: a small direct-mapped cache (SCORE_CACHE entries keyed by
 * the bin and the exact Float32 bits of cost and margin, ≈ 80 KiB per call) answers repeats
 * with the same number.
 */
export function scorePixelRows(input: ScoreInput, out: PixelPassOutput, y0: number, y1: number): number {
  const { rgb, width, status } = input;
  const bins = scoreBins(input);
  const cache = createScoreCache();
  const costBits = new Int32Array(out.cost.buffer, out.cost.byteOffset, out.cost.length);
  const marginBits = new Int32Array(out.alternativeCost.buffer, out.alternativeCost.byteOffset, out.alternativeCost.length);
  let poor = 0;
  const { codes, values, levels } = rgb;
  for (let i = y0 * width, end = y1 * width; i < end; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    const k = i * 3;
    const luma = codes !== null
      ? 0.2126 * levels[codes[k]] + 0.7152 * levels[codes[k + 1]] + 0.0722 * levels[codes[k + 2]]
      : 0.2126 * values[k] + 0.7152 * values[k + 1] + 0.0722 * values[k + 2];
    let bin = Math.floor(luma * NOISE_BINS);
    bin = bin < 0 ? 0 : bin > NOISE_BINS - 1 ? NOISE_BINS - 1 : bin;
    // A poor match loses its status but keeps its estimate and confidence for a second look
    // (keepConsistent.ts), which drops or keeps it.
    if (out.cost[i] > bins.poorLimit[bin]) {
      status[i] = PixelStatus.ambiguous;
      poor++;
    }
    const slot = cacheSlot(bin, costBits[i], marginBits[i]);
    if (cache.bin[slot] === bin && cache.cost[slot] === costBits[i] && cache.margin[slot] === marginBits[i]) {
      out.cost[i] = cache.confidence[slot];
      continue;
    }
    cache.bin[slot] = bin;
    cache.cost[slot] = costBits[i];
    cache.margin[slot] = marginBits[i];
    const confidence = confidenceOf(bins, bin, out.cost[i], out.alternativeCost[i]);
    cache.confidence[slot] = confidence;
    out.cost[i] = confidence;
  }
  return poor;
}

/** Per noise bin: the noise cost (floored), the poor-match limit and the fit term's scale. */
interface ScoreBins {
  readonly noiseCost: Float64Array;
  readonly poorLimit: Float64Array;
  readonly fitScale: Float64Array;
}

function scoreBins(input: ScoreInput): ScoreBins {
  const { noise, medianCost, modelSlack } = input;
  const floorCost = medianCost / 2.37;
  const poorMedian = 9 * medianCost;
  const bins: ScoreBins = { noiseCost: new Float64Array(NOISE_BINS), poorLimit: new Float64Array(NOISE_BINS), fitScale: new Float64Array(NOISE_BINS) };
  for (let bin = 0; bin < NOISE_BINS; bin++) {
    const sigma = noise.sigmaByLuma[bin];
    const noiseCost = 3 * sigma * sigma;
    const pixelNoiseCost = noiseCost > floorCost ? noiseCost : floorCost;
    const limit = 10 * pixelNoiseCost + modelSlack;
    bins.noiseCost[bin] = pixelNoiseCost;
    bins.poorLimit[bin] = limit > poorMedian ? limit : poorMedian;
    bins.fitScale[bin] = 4 * pixelNoiseCost + modelSlack;
  }
  return bins;
}

function confidenceOf(bins: ScoreBins, bin: number, cost: number, alternative: number): number {
  const fitTerm = Math.exp(-cost / bins.fitScale[bin]);
  // 1 − e^(−u) rounds to exactly 1 in double precision for u > 37 (e^(−37) < 2^(−53)).
  const u = alternative === Infinity ? Infinity : (alternative - cost) / bins.noiseCost[bin];
  const marginTerm = u > 37 ? 1 : 1 - Math.exp(-(u > 0 ? u : 0));
  return fitTerm * marginTerm;
}

const SCORE_CACHE_BITS = 12;

interface ScoreCache {
  readonly bin: Int32Array;
  readonly cost: Int32Array;
  readonly margin: Int32Array;
  readonly confidence: Float64Array;
}

function createScoreCache(): ScoreCache {
  const size = 1 << SCORE_CACHE_BITS;
  return { bin: new Int32Array(size).fill(-1), cost: new Int32Array(size), margin: new Int32Array(size), confidence: new Float64Array(size) };
}

function cacheSlot(bin: number, costBits: number, marginBits: number): number {
  return Math.imul(costBits ^ Math.imul(marginBits ^ bin, 0x85ebca6b), 0x9e3779b1) >>> (32 - SCORE_CACHE_BITS);
}
