/**
 * Per-pixel matching of one encoded colour against the predicted table: each candidate from
 * the cube is walked downhill to the local minimum of the squared colour distance, refined to a
 * sub-step position by a parabola through the three neighbouring samples, and de-duplicated.
 * Works on caller-owned scratch arrays: no allocation per pixel.
 */
import { type CandidateCube, buildCell, cellOf, distanceAt } from './candidateCube.js';

export interface MatchScratch {
  /** Sub-step table positions of the candidates found (sorted by cost). */
  readonly position: Float64Array;
  readonly cost: Float64Array;
  readonly cubeCost: Float64Array;
}

export function createMatchScratch(perCell: number): MatchScratch {
  return {
    position: new Float64Array(perCell),
    cost: new Float64Array(perCell),
    cubeCost: new Float64Array(perCell),
  };
}

/** Most steps of one downhill walk (a walk that uses them all may stop short of a minimum). */
export const MAX_WALK = 64;

/**
 * Finds the local minimum reached by walking downhill from `start`. The walk moves one way only
 * (the sample it left is higher than where it is), one index per step.
 */
export function walkDownhill(
  predicted: Float32Array,
  count: number,
  r: number,
  g: number,
  b: number,
  start: number,
): number {
  let i = start;
  let here = distanceAt(predicted, i, r, g, b);
  for (let step = 0; step < MAX_WALK; step++) {
    const left = i > 0 ? distanceAt(predicted, i - 1, r, g, b) : Infinity;
    const right = i + 1 < count ? distanceAt(predicted, i + 1, r, g, b) : Infinity;
    if (left < here && left <= right) {
      i--;
      here = left;
    } else if (right < here) {
      i++;
      here = right;
    } else break;
  }
  return i;
}

/**
 * Refines integer table index `i` (a local minimum) to a sub-step position; returns the
 * position and writes the interpolated cost into `costOut[slot]`.
 */
export function refinePosition(
  predicted: Float32Array,
  count: number,
  r: number,
  g: number,
  b: number,
  i: number,
  costOut: Float64Array,
  slot: number,
): number {
  const here = distanceAt(predicted, i, r, g, b);
  if (i <= 0 || i >= count - 1) {
    costOut[slot] = here;
    return i;
  }
  const left = distanceAt(predicted, i - 1, r, g, b);
  const right = distanceAt(predicted, i + 1, r, g, b);
  const curvature = left - 2 * here + right;
  if (curvature <= 0) {
    costOut[slot] = here;
    return i;
  }
  let offset = (0.5 * (left - right)) / curvature;
  if (offset > 0.5) offset = 0.5;
  else if (offset < -0.5) offset = -0.5;
  const cost = here - 0.25 * (left - right) * offset;
  costOut[slot] = cost > 0 ? cost : 0;
  return i + offset;
}

/**
 * All distinct candidate thickness positions for one colour, sorted by cost (best first).
 * Returns how many were written into `scratch.position` / `scratch.cost`.
 */
export function matchColour(
  cube: CandidateCube,
  predicted: Float32Array,
  count: number,
  r: number,
  g: number,
  b: number,
  scratch: MatchScratch,
): number {
  const cell = cellOf(cube.levels, r, g, b);
  if (!cube.built[cell]) buildCell(cube, cell, predicted, count, scratch.cubeCost);
  const base = cell * cube.perCell;
  const { position, cost } = scratch;
  let found = 0;
  for (let k = 0; k < cube.perCell; k++) {
    const start = cube.candidates[base + k];
    if (start < 0) break;
    const minimum = walkDownhill(predicted, count, r, g, b, start);
    let duplicate = false;
    for (let j = 0; j < found; j++) {
      if (Math.abs(position[j] - minimum) < 1) {
        duplicate = true;
        break;
      }
    }
    if (duplicate) continue;
    position[found] = refinePosition(predicted, count, r, g, b, minimum, cost, found);
    found++;
  }
  // Insertion sort by cost (found ≤ perCell, a handful).
  for (let i = 1; i < found; i++) {
    const p = position[i];
    const c = cost[i];
    let j = i - 1;
    while (j >= 0 && cost[j] > c) {
      position[j + 1] = position[j];
      cost[j + 1] = cost[j];
      j--;
    }
    position[j + 1] = p;
    cost[j + 1] = c;
  }
  return found;
}
