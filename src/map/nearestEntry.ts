/**
 * Exact nearest table entry for many colours: the predicted table's entries (count × 3) are
 * binned on a uniform grid over their bounding box, and a query searches cells in growing cubic
 * shells around its own until no unsearched cell can hold a closer entry (the distance from the
 * query to the searched box's faces bounds every entry outside it). The answer is the same as a
 * scan over every entry — the smallest squared distance, the lowest index among equals — at a
 * small fraction of the distance evaluations, since a table's colours lie along a curve.
 *
 * Built once per predicted table (a fit evaluates many); queries allocate nothing.
 */
import { distanceAt } from './candidateCube.js';

export interface NearestEntryIndex {
  readonly predicted: Float32Array;
  readonly count: number;
  readonly stride: number;
  /** Cells per axis of the grid. */
  readonly cells: number;
  readonly lo: Float64Array;
  readonly size: Float64Array;
  /** Entries of cell c: members[start[c] .. start[c + 1]), ascending. */
  readonly start: Int32Array;
  readonly members: Int32Array;
}

/**
 * Cells per axis: 32 for a full table, fewer for a small one (a judgement, measured on the demo
 * film: 2,001 entries were found as fast on 16³ to 32³ cells; the fit's coarse exposure scan of
 * 167 entries was a quarter faster on 12³, where building 32³ empty cells cost more than the
 * queries). The answer is the same whatever the grid.
 */
function cellsFor(entries: number): number {
  return entries <= 1000 ? 12 : 32;
}
/** Shells searched before a plain scan takes over (a judgement: ring 2 has visited 125 cells). */
const MAX_RING = 2;

/** Index of every `stride`-th entry of the table (stride 1: all). */
export function buildNearestEntryIndex(predicted: Float32Array, count: number, stride = 1): NearestEntryIndex {
  const lo = Float64Array.of(Infinity, Infinity, Infinity);
  const hi = Float64Array.of(-Infinity, -Infinity, -Infinity);
  for (let t = 0; t < count; t += stride) {
    for (let c = 0; c < 3; c++) {
      const v = predicted[t * 3 + c];
      if (v < lo[c]) lo[c] = v;
      if (v > hi[c]) hi[c] = v;
    }
  }
  const cells = cellsFor(Math.ceil(count / stride));
  const size = new Float64Array(3);
  for (let c = 0; c < 3; c++) size[c] = Math.max((hi[c] - lo[c]) / cells, 1e-9);
  const cellCount = cells * cells * cells;
  const start = new Int32Array(cellCount + 1);
  const cellOfEntry = new Int32Array(Math.ceil(count / stride));
  let k = 0;
  for (let t = 0; t < count; t += stride, k++) {
    const cell = cellIndex(predicted[t * 3], predicted[t * 3 + 1], predicted[t * 3 + 2], lo, size, cells);
    cellOfEntry[k] = cell;
    start[cell + 1]++;
  }
  for (let c = 0; c < cellCount; c++) start[c + 1] += start[c];
  const fill = start.slice(0, cellCount);
  const members = new Int32Array(k);
  k = 0;
  for (let t = 0; t < count; t += stride, k++) members[fill[cellOfEntry[k]]++] = t;
  return { predicted, count, stride, cells, lo, size, start, members };
}

function axisCell(value: number, lo: number, size: number, cells: number): number {
  const q = Math.floor((value - lo) / size);
  return q < 0 ? 0 : q >= cells ? cells - 1 : q;
}

function cellIndex(r: number, g: number, b: number, lo: Float64Array, size: Float64Array, cells: number): number {
  return (axisCell(r, lo[0], size[0], cells) * cells + axisCell(g, lo[1], size[1], cells)) * cells + axisCell(b, lo[2], size[2], cells);
}

/** Result of the last query: the entry and its squared distance. */
export interface NearestHit {
  index: number;
  distance: number;
}

/** Finds the entry nearest to (r, g, b), writing it into `hit` (index −1 for an empty index). */
export function nearestEntry(index: NearestEntryIndex, r: number, g: number, b: number, hit: NearestHit): void {
  const { predicted, lo, size, start, members, cells } = index;
  const cr = axisCell(r, lo[0], size[0], cells);
  const cg = axisCell(g, lo[1], size[1], cells);
  const cb = axisCell(b, lo[2], size[2], cells);
  let best = Infinity;
  let bestIndex = -1;
  for (let ring = 0; ; ring++) {
    if (ring > MAX_RING) {
      // Far from every entry (e.g. a trial exposure far off): shells would visit more cells
      // than there are entries; a plain scan is cheaper.
      scanAll(index, r, g, b, hit);
      return;
    }
    const r0 = cr - ring;
    const r1 = cr + ring;
    const g0 = cg - ring;
    const g1 = cg + ring;
    const b0 = cb - ring;
    const b1 = cb + ring;
    for (let i = r0 < 0 ? 0 : r0; i <= (r1 >= cells ? cells - 1 : r1); i++) {
      const onR = i === r0 || i === r1;
      for (let j = g0 < 0 ? 0 : g0; j <= (g1 >= cells ? cells - 1 : g1); j++) {
        const onG = onR || j === g0 || j === g1;
        for (let l = b0 < 0 ? 0 : b0; l <= (b1 >= cells ? cells - 1 : b1); l++) {
          // Only the shell: the inside was searched by the smaller rings.
          if (!onG && l !== b0 && l !== b1) continue;
          const cell = (i * cells + j) * cells + l;
          for (let m = start[cell], end = start[cell + 1]; m < end; m++) {
            const t = members[m];
            const d = distanceAt(predicted, t, r, g, b);
            if (d < best || (d === best && t < bestIndex)) {
              best = d;
              bestIndex = t;
            }
          }
        }
      }
    }
    // Every entry outside the searched box lies beyond one of its faces (a face at the grid's
    // edge has nothing beyond it).
    const bound = Math.min(
      faceGap(r, lo[0], size[0], r0, r1, cells),
      faceGap(g, lo[1], size[1], g0, g1, cells),
      faceGap(b, lo[2], size[2], b0, b1, cells),
    );
    // (A hair inside the faces: a colour on a cell boundary may have been binned either side.)
    const safe = bound - 1e-9;
    if (bound === Infinity || (safe > 0 && best < safe * safe)) break;
  }
  hit.index = bestIndex;
  hit.distance = best;
}

function scanAll(index: NearestEntryIndex, r: number, g: number, b: number, hit: NearestHit): void {
  const { predicted, count, stride } = index;
  let best = Infinity;
  let bestIndex = -1;
  for (let t = 0; t < count; t += stride) {
    const d = distanceAt(predicted, t, r, g, b);
    if (d < best) {
      best = d;
      bestIndex = t;
    }
  }
  hit.index = bestIndex;
  hit.distance = best;
}

/** Distance from a coordinate to the nearer face of cells [c0, c1] beyond which entries may lie (0 when outside them). */
function faceGap(value: number, lo: number, size: number, c0: number, c1: number, cells: number): number {
  const below = c0 <= 0 ? Infinity : value - (lo + c0 * size);
  const above = c1 >= cells - 1 ? Infinity : lo + (c1 + 1) * size - value;
  const gap = below < above ? below : above;
  return gap > 0 ? gap : 0;
}
