/**
 * Gives every usable pixel a branch: zone pixels take their zone's, band pixels and specks take
 * the branch of the nearest zone (breadth-first from all zone pixels at once, 4-connected, over
 * usable pixels only). On each side of a band the pixels thus join the zone they border, so the
 * thickness stays continuous through the extreme (both branches meet at the extreme's thickness).
 */
import { growBreadthFirst } from './breadthFirst.js';
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
  let tail = 0;
  for (let p = 0; p < n; p++) {
    const z = seg.zoneOf[p];
    if (z < 0 || zones.zoneBranch[z] === NO_BRANCH) continue;
    branch[p] = zones.zoneBranch[z];
    sourceZone[p] = z;
    queue[tail++] = p;
  }
  growBreadthFirst(queue, tail, width, height, (from, to) => {
    if (!usable[to] || sourceZone[to] >= 0) return false;
    branch[to] = branch[from];
    sourceZone[to] = sourceZone[from];
    return true;
  });
  return { branch, sourceZone };
}
