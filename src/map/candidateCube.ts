/**
 * Colour → candidate-thickness lookup. The encoded colour cube is quantised to `levels` cells
 * per channel; for every cell that the photo occupies, the table indices of the K best local
 * minima of the squared colour distance (from the cell centre) are stored. A pixel then costs a
 * cell look-up plus a short downhill walk per candidate (see `matchColour.ts`), instead of a
 * scan over the whole thickness table.
 */

export interface CandidateCube {
  readonly levels: number;
  readonly perCell: number;
  /** levels³ × perCell table indices; -1 = none. */
  readonly candidates: Int32Array;
  /** 1 where the cell's candidates have been computed. */
  readonly built: Uint8Array;
  /**
   * Per channel and level, each table entry's squared distance outside the cells' box along that
   * channel (see `boxTerms`), computed for the table in `termsOf` when a cell first needs it.
   */
  terms: Float64Array | null;
  /** 1 where that channel and level's row of `terms` has been computed. */
  termsReady: Uint8Array | null;
  /** Per row of `terms`, the least value over each block of BLOCK entries (the last block may be shorter). */
  blockMins: Float64Array | null;
  /** The predicted table `terms` belongs to. */
  termsOf: Float32Array | null;
}

export function cellOf(levels: number, r: number, g: number, b: number): number {
  const qr = quantise(levels, r);
  const qg = quantise(levels, g);
  const qb = quantise(levels, b);
  return (qr * levels + qg) * levels + qb;
}

function quantise(levels: number, value: number): number {
  const q = (value * levels) | 0;
  return q < 0 ? 0 : q >= levels ? levels - 1 : q;
}

export function createCandidateCube(levels: number, perCell: number): CandidateCube {
  const cells = levels * levels * levels;
  return {
    levels,
    perCell,
    candidates: new Int32Array(cells * perCell).fill(-1),
    built: new Uint8Array(cells),
    terms: null,
    termsReady: null,
    blockMins: null,
    termsOf: null,
  };
}

/**
 * Computes the candidates of one cell from the predicted encoded table (count × 3): the table's
 * colour curve, followed along the thickness axis, either passes through the cell's box or comes
 * near it. Each pass through the box is one candidate (its entry nearest the cell's centre,
 * ranked first); each closest approach outside the box (a local minimum of the squared distance
 * from the box) is one more, ranked by that distance. The `perCell` best are kept.
 *
 * Why from the box, one per pass: a pixel anywhere in the cell must find the basin of its own
 * colour whenever the curve passes through the cell. Ranked by the distance from the centre, as
 * local minima of it, a pale colour of thick soap film lost its basin: round the grey axis the
 * curve passes through one cell five times (1,180–1,200, 1,275–1,305, 1,400–1,565, 1,635–1,810
 * and 1,865–2,000 nm on the demo's frame 0), and its long, wavering passes each gave several minima
 * nearer the centre, filling all six places; a 30-row band of film at 1,275–1,300 nm was measured
 * a whole order too thick.
 */
export function buildCell(
  cube: CandidateCube,
  cell: number,
  predicted: Float32Array,
  count: number,
  scratchCost: Float64Array,
): void {
  const { levels, perCell, candidates } = cube;
  const qb = cell % levels;
  const qg = ((cell - qb) / levels) % levels;
  const qr = (cell - qb - qg * levels) / (levels * levels);
  const r = (qr + 0.5) / levels;
  const g = (qg + 0.5) / levels;
  const b = (qb + 0.5) / levels;
  const terms = boxTerms(cube, predicted, count);
  const rowR = rowOf(cube, terms, 0, qr, predicted, count);
  const rowG = rowOf(cube, terms, 1, qg, predicted, count);
  const rowB = rowOf(cube, terms, 2, qb, predicted, count);
  const mins = cube.blockMins!;
  const blocks = blockCount(count);
  const minR = (rowR / count) * blocks;
  const minG = (rowG / count) * blocks;
  const minB = (rowB / count) * blocks;
  for (let i = 0; i < perCell; i++) scratchCost[i] = Infinity;
  const base = cell * perCell;
  // A pass through the box: its entry nearest the centre, and that entry's distance from the centre.
  let passIndex = -1;
  let passCentre = Infinity;
  let prev = Infinity;
  // The squared distance of entry i from the cell's box (0 inside): the three channels' terms.
  let here = terms[rowR] + terms[rowG] + terms[rowB];
  for (let i = 0; i < count; i++) {
    if ((i & (BLOCK - 1)) === 0 && i > 0 && i + BLOCK < count) {
      // A block none of whose entries can count is stepped over: every entry's distance is at
      // least the sum of the three rows' least values over the block (rounding is monotone, the
      // sum taken in the same order), so when that bound is above 0 (no pass through the box)
      // and not below the worst kept cost (which only falls), each would be turned away.
      const k = i / BLOCK;
      const bound = mins[minR + k] + mins[minG + k] + mins[minB + k];
      if (bound > 0 && bound >= scratchCost[perCell - 1]) {
        const last = i + BLOCK - 1;
        prev = terms[rowR + last] + terms[rowG + last] + terms[rowB + last];
        here = terms[rowR + last + 1] + terms[rowG + last + 1] + terms[rowB + last + 1];
        i = last;
        continue;
      }
    }
    const next = i + 1 < count ? terms[rowR + i + 1] + terms[rowG + i + 1] + terms[rowB + i + 1] : Infinity;
    if (here === 0) {
      const centre = distanceAt(predicted, i, r, g, b);
      if (centre < passCentre) {
        passCentre = centre;
        passIndex = i;
      }
      if (next !== 0) {
        // Inside the box every pass ranks before every near miss (whose distance is > 0).
        insertBest(candidates, scratchCost, base, perCell, passIndex, -1 / (1 + passCentre));
        passIndex = -1;
        passCentre = Infinity;
      }
    } else if (here <= prev && here < next) {
      insertBest(candidates, scratchCost, base, perCell, i, here);
    }
    prev = here;
    here = next;
  }
  cube.built[cell] = 1;
}

/**
 * The cube's per-channel terms for `predicted` (3 × levels rows of `count` values), allocated
 * afresh when the cube meets another table. Row (c, q) holds, for every entry, the squared
 * distance of channel c's value outside the interval of cells at level q (0 inside): the
 * squared distance of an entry from a cell's box is the sum of its three rows' values, the same
 * number, to the last bit, as computing it entry by entry (the same operations, in the same order).
 */
function boxTerms(cube: CandidateCube, predicted: Float32Array, count: number): Float64Array {
  if (cube.terms !== null && cube.termsOf === predicted && cube.terms.length === 3 * cube.levels * count) return cube.terms;
  cube.terms = new Float64Array(3 * cube.levels * count);
  cube.termsReady = new Uint8Array(3 * cube.levels);
  cube.blockMins = new Float64Array(3 * cube.levels * blockCount(count));
  cube.termsOf = predicted;
  return cube.terms;
}

/** Entries per block of `blockMins` (a power of two). */
const BLOCK = 16;

function blockCount(count: number): number {
  return Math.ceil(count / BLOCK);
}

/** The offset of row (channel, q) in `terms`, computed on first need. */
function rowOf(cube: CandidateCube, terms: Float64Array, channel: number, q: number, predicted: Float32Array, count: number): number {
  const row = channel * cube.levels + q;
  const offset = row * count;
  if (cube.termsReady![row] === 1) return offset;
  const levels = cube.levels;
  const half = 0.5 / levels;
  const centre = (q + 0.5) / levels;
  for (let i = 0; i < count; i++) {
    const d = Math.abs(predicted[i * 3 + channel] - centre) - half;
    terms[offset + i] = d > 0 ? d * d : 0;
  }
  const blocks = blockCount(count);
  const mins = cube.blockMins!;
  for (let k = 0; k < blocks; k++) {
    let least = Infinity;
    for (let i = k * BLOCK, end = Math.min(count, i + BLOCK); i < end; i++) if (terms[offset + i] < least) least = terms[offset + i];
    mins[row * blocks + k] = least;
  }
  cube.termsReady![row] = 1;
  return offset;
}

function insertBest(
  candidates: Int32Array,
  costs: Float64Array,
  base: number,
  perCell: number,
  index: number,
  cost: number,
): void {
  if (cost >= costs[perCell - 1]) return;
  let j = perCell - 1;
  while (j > 0 && costs[j - 1] > cost) {
    costs[j] = costs[j - 1];
    candidates[base + j] = candidates[base + j - 1];
    j--;
  }
  costs[j] = cost;
  candidates[base + j] = index;
}

export function distanceAt(predicted: Float32Array, index: number, r: number, g: number, b: number): number {
  const o = index * 3;
  const dr = predicted[o] - r;
  const dg = predicted[o + 1] - g;
  const db = predicted[o + 2] - b;
  return dr * dr + dg * dg + db * db;
}
