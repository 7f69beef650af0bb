/**
 * Evenly spaced wavelength grids built as from + i·step (never a running sum, so the last point
 * does not drift), including `toNm` when it falls on the grid within 1e-9 of a step.
 */

/** Upper bound on grid length, to catch a step typed in the wrong unit. */
export const MAX_GRID_POINTS = 1_000_000;

export function wavelengthGrid(fromNm: number, toNm: number, stepNm: number): Float64Array {
  if (!Number.isFinite(fromNm) || fromNm <= 0) throw new RangeError(`fromNm must be a finite number > 0, received ${fromNm}`);
  if (!Number.isFinite(toNm) || toNm < fromNm) throw new RangeError(`toNm must be a finite number >= fromNm (${fromNm}), received ${toNm}`);
  if (!Number.isFinite(stepNm) || stepNm <= 0) throw new RangeError(`stepNm must be a finite number > 0, received ${stepNm}`);
  const count = Math.floor((toNm - fromNm) / stepNm + 1e-9) + 1;
  if (count > MAX_GRID_POINTS) {
    throw new RangeError(`wavelength grid ${fromNm}–${toNm} nm in steps of ${stepNm} nm has ${count} points, more than ${MAX_GRID_POINTS}`);
  }
  const grid = new Float64Array(count);
  for (let i = 0; i < count; i++) grid[i] = fromNm + i * stepNm;
  return grid;
}
