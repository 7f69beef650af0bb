/**
 * Candidate thicknesses of every cell of a grid (a pixel, or a block of pixels on the coarse
 * grid of a large photo): up to `perCell` table positions with their colour costs, best first.
 */

export interface CandidateField {
  readonly width: number;
  readonly height: number;
  readonly perCell: number;
  /** Number of candidates per cell (0 = cell not usable). */
  readonly count: Uint8Array;
  /** width·height·perCell table positions (sub-step, in table-index units). */
  readonly position: Float32Array;
  /** width·height·perCell squared colour distances (encoded units²). */
  readonly cost: Float32Array;
}

export function createCandidateField(width: number, height: number, perCell: number): CandidateField {
  const cells = width * height;
  return {
    width,
    height,
    perCell,
    count: new Uint8Array(cells),
    position: new Float32Array(cells * perCell),
    cost: new Float32Array(cells * perCell),
  };
}
