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
  const half = 0.5 / levels;
  const r = (qr + 0.5) / levels;
  const g = (qg + 0.5) / levels;
  const b = (qb + 0.5) / levels;
  for (let i = 0; i < perCell; i++) scratchCost[i] = Infinity;
  const base = cell * perCell;
  // A pass through the box: its entry nearest the centre, and that entry's distance from the centre.
  let passIndex = -1;
  let passCentre = Infinity;
  let prev = Infinity;
  let here = boxDistanceAt(predicted, 0, r, g, b, half);
  for (let i = 0; i < count; i++) {
    const next = i + 1 < count ? boxDistanceAt(predicted, i + 1, r, g, b, half) : Infinity;
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

/** Squared distance of table entry `index` from the box of half-width `half` round (r, g, b); 0 inside. */
function boxDistanceAt(predicted: Float32Array, index: number, r: number, g: number, b: number, half: number): number {
  const o = index * 3;
  const dr = Math.abs(predicted[o] - r) - half;
  const dg = Math.abs(predicted[o + 1] - g) - half;
  const db = Math.abs(predicted[o + 2] - b) - half;
  return (dr > 0 ? dr * dr : 0) + (dg > 0 ? dg * dg : 0) + (db > 0 ? db * db : 0);
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
