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
  };
}

/**
 * Computes the candidates of one cell from the predicted encoded table (count × 3): the
 * `perCell` lowest local minima of the distance from the cell centre along the thickness axis.
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
  for (let i = 0; i < perCell; i++) scratchCost[i] = Infinity;
  const base = cell * perCell;
  let prev = Infinity;
  let here = distanceAt(predicted, 0, r, g, b);
  for (let i = 0; i < count; i++) {
    const next = i + 1 < count ? distanceAt(predicted, i + 1, r, g, b) : Infinity;
    if (here <= prev && here < next) insertBest(candidates, scratchCost, base, perCell, i, here);
    prev = here;
    here = next;
  }
  cube.built[cell] = 1;
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
