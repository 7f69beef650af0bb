/**
 * Gives every usable pixel a branch: zone pixels take their zone's, band pixels and specks take
 * the branch of the nearest zone (breadth-first from all zone pixels at once, 4-connected, over
 * usable pixels only). On each side of a band the pixels thus join the zone they border, so the
 * thickness stays continuous through the extreme (both branches meet at the extreme's thickness).
 */
import type { FringeSegments } from './fringeSegments.js';
import { NO_BRANCH, type ZoneBranches } from './zoneBranches.js';

export interface PixelBranches {
  /** Branch per pixel, NO_BRANCH where no zone is reachable. */
  readonly branch: Int32Array;
  /** Zone a pixel took its branch from (−1 if none). */
  readonly sourceZone: Int32Array;
}

export function fillPixelBranches(
  seg: FringeSegments,
  zones: ZoneBranches,
  usable: Uint8Array,
  width: number,
  height: number,
): PixelBranches {
  const n = width * height;
  const branch = new Int32Array(n).fill(NO_BRANCH);
  const sourceZone = new Int32Array(n).fill(-1);
  const queue = new Int32Array(n);
  let head = 0;
  let tail = 0;
  for (let p = 0; p < n; p++) {
    const z = seg.zoneOf[p];
    if (z < 0 || zones.zoneBranch[z] === NO_BRANCH) continue;
    branch[p] = zones.zoneBranch[z];
    sourceZone[p] = z;
    queue[tail++] = p;
  }
  while (head < tail) {
    const p = queue[head++];
    const x = p % width;
    const y = (p - x) / width;
    for (let k = 0; k < 4; k++) {
      const nx = k === 0 ? x - 1 : k === 1 ? x + 1 : x;
      const ny = k === 2 ? y - 1 : k === 3 ? y + 1 : y;
      if (nx < 0 || ny < 0 || nx >= width || ny >= height) continue;
      const q = ny * width + nx;
      if (!usable[q] || sourceZone[q] >= 0) continue;
      branch[q] = branch[p];
      sourceZone[q] = sourceZone[p];
      queue[tail++] = q;
    }
  }
  return { branch, sourceZone };
}
