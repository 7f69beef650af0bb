/**
 * Fringe counting on the graph of slope zones and extreme bands (see `fringeSegments.ts`).
 *
 * Branch b of R(h) runs from extreme b to extreme b + 1, and the kinds of extremes alternate
 * (bright, dark, bright …, common practice for a lossless film). A zone on branch b meets bands of
 * two kinds: crossing a band of the kind of extreme b + 1 leads to branch b + 1, crossing one of
 * the kind of extreme b leads to branch b − 1. So once one zone's branch is known, every zone
 * reachable through bands follows, and the fringe count is exact as long as no band is broken.
 * Zones are visited largest first (quality-guided: large zones are the least likely to be noise);
 * a zone reached twice with different branches is a conflict, and the smaller zone of the pair is
 * flagged ambiguous.
 *
 * Seeds: anchors (a known thickness, or a black film = order 0) give absolute branches, and a
 * zone on branch 0 crossing the kind of extreme 0 stays on branch 0 (the film touches zero
 * thickness, a black film, and thickens again). Without a seed the count is relative: both
 * parities of the largest zone are tried, each result is shifted by an even number of branches
 * so the thinnest zone is as thin as possible, and the hypothesis with fewer conflicts, then the
 * lower thinnest branch, then the lower area-weighted mean branch wins ("the thinnest part of the
 * film is in the first order"). When both parities tie, the direction of counting is a guess.
 * In a photo series, the previous frame's map replaces that assumption (see below).
 */
import type { FringeSegments } from './fringeSegments.js';

export interface ZoneSeed {
  readonly zone: number;
  readonly branch: number;
}

export interface ZoneBranches {
  /** Branch per zone; NO_BRANCH where unknown. */
  readonly zoneBranch: Int32Array;
  readonly zoneAmbiguous: Uint8Array;
  /** Number of conflicts (inconsistent fringe counts around a loop). */
  readonly conflicts: number;
  /** Largest zone of each seedless component whose counting direction is a guess. */
  readonly guessedDirectionZones: number[];
  /** Seedless components (counted relative to an assumed first order). */
  readonly unseededComponents: number;
}

export const NO_BRANCH = -2147483648;

/** Branch reached from `branch` by passing an extreme of `kind` (+1 bright, −1 dark). */
export function branchAcross(branch: number, kind: number, firstKind: number): number {
  const upperKind = (branch + 1) % 2 === 0 ? firstKind : -firstKind;
  return upperKind === kind ? branch + 1 : branch - 1;
}

interface Propagation {
  branch: Int32Array;
  conflicts: Array<[number, number]>;
}

function propagate(seg: FringeSegments, firstKind: number, seeds: readonly ZoneSeed[], reflectAtZero: boolean): Propagation {
  const zoneCount = seg.zoneArea.length;
  const branch = new Int32Array(zoneCount).fill(NO_BRANCH);
  const conflicts: Array<[number, number]> = [];
  // Max-heap on zone area of pending (zone, branch, fromZone) triples.
  const heap: Array<[number, number, number, number]> = [];
  const push = (item: [number, number, number, number]): void => {
    heap.push(item);
    let i = heap.length - 1;
    while (i > 0) {
      const parent = (i - 1) >> 1;
      if (heap[parent][0] >= item[0]) break;
      heap[i] = heap[parent];
      i = parent;
    }
    heap[i] = item;
  };
  const pop = (): [number, number, number, number] => {
    const top = heap[0];
    const last = heap.pop()!;
    if (heap.length > 0) {
      let i = 0;
      for (;;) {
        const l = 2 * i + 1;
        const r = l + 1;
        let m = i;
        const key = (k: number): number => (k === i ? last[0] : heap[k][0]);
        if (l < heap.length && heap[l][0] > key(m)) m = l;
        if (r < heap.length && heap[r][0] > key(m)) m = r;
        if (m === i) break;
        heap[i] = heap[m];
        i = m;
      }
      heap[i] = last;
    }
    return top;
  };
  for (const seed of seeds) push([Infinity, seed.zone, seed.branch, -1]);
  while (heap.length > 0) {
    const [, zone, b, from] = pop();
    if (branch[zone] !== NO_BRANCH) {
      if (branch[zone] !== b && from >= 0) conflicts.push([zone, from]);
      continue;
    }
    branch[zone] = b;
    for (const band of seg.zoneBands[zone]) {
      const kind = seg.bandKind[band];
      let next = branchAcross(b, kind, firstKind);
      if (next < 0 && reflectAtZero) next = 0;
      for (const other of seg.bandZones[band]) {
        if (other === zone) continue;
        if (branch[other] === NO_BRANCH) push([seg.zoneArea[other], other, next, zone]);
        else if (branch[other] !== next) conflicts.push([other, zone]);
      }
    }
  }
  return { branch, conflicts };
}

/** Connected components of the zone graph (zones linked through shared bands). */
function zoneComponents(seg: FringeSegments): Int32Array {
  const component = new Int32Array(seg.zoneArea.length).fill(-1);
  let next = 0;
  for (let start = 0; start < component.length; start++) {
    if (component[start] >= 0) continue;
    const queue = [start];
    component[start] = next;
    while (queue.length > 0) {
      const z = queue.pop()!;
      for (const band of seg.zoneBands[z]) {
        for (const other of seg.bandZones[band]) {
          if (component[other] < 0) {
            component[other] = next;
            queue.push(other);
          }
        }
      }
    }
    next++;
  }
  return component;
}

/**
 * `priorBranch` (optional, per zone, NaN where unknown): the branch a previous frame of a series
 * suggests. In a seedless component with prior values, each parity's count is shifted (by an even
 * number) to agree best with the prior, area-weighted, and the parity that agrees best wins.
 */
export function solveZoneBranches(
  seg: FringeSegments,
  firstKind: number,
  seeds: readonly ZoneSeed[],
  priorBranch: Float64Array | null = null,
): ZoneBranches {
  const zoneCount = seg.zoneArea.length;
  const component = zoneComponents(seg);
  const componentCount = zoneCount === 0 ? 0 : Math.max(...component) + 1;
  const zoneBranch = new Int32Array(zoneCount).fill(NO_BRANCH);
  const zoneAmbiguous = new Uint8Array(zoneCount);
  const guessedDirectionZones: number[] = [];
  let conflicts = 0;
  let unseededComponents = 0;
  const members: number[][] = Array.from({ length: componentCount }, () => []);
  for (let z = 0; z < zoneCount; z++) members[component[z]].push(z);
  const flag = (list: Array<[number, number]>): void => {
    for (const [a, b] of list) zoneAmbiguous[seg.zoneArea[a] <= seg.zoneArea[b] ? a : b] = 1;
    conflicts += list.length;
  };
  for (let c = 0; c < componentCount; c++) {
    const zones = members[c];
    const own = seeds.filter((s) => component[s.zone] === c);
    if (own.length > 0) {
      const result = propagate(seg, firstKind, own, true);
      for (const z of zones) zoneBranch[z] = result.branch[z];
      flag(result.conflicts);
      continue;
    }
    unseededComponents++;
    let largest = zones[0];
    for (const z of zones) if (seg.zoneArea[z] > seg.zoneArea[largest]) largest = z;
    const withPrior = priorBranch !== null && zones.some((z) => !Number.isNaN(priorBranch[z]));
    const scored = [0, 1].map((parity) => {
      const result = propagate(seg, firstKind, [{ zone: largest, branch: parity }], false);
      let min = Infinity;
      for (const z of zones) min = Math.min(min, result.branch[z]);
      let shift = 2 * Math.ceil(-min / 2);
      let disagreement = 0;
      if (withPrior) {
        const cost = (s: number): number => {
          let c = 0;
          for (const z of zones) if (!Number.isNaN(priorBranch[z])) c += seg.zoneArea[z] * Math.abs(result.branch[z] + s - priorBranch[z]);
          return c;
        };
        disagreement = Infinity;
        for (let s = shift; s <= shift + 2 * (seg.zoneArea.length + 2); s += 2) {
          const c = cost(s);
          if (c < disagreement) {
            disagreement = c;
            shift = s;
          }
        }
      }
      let weighted = 0;
      let area = 0;
      for (const z of zones) {
        weighted += (result.branch[z] + shift) * seg.zoneArea[z];
        area += seg.zoneArea[z];
      }
      return { result, shift, min: min + shift, mean: weighted / area, conflicts: result.conflicts.length, disagreement };
    });
    scored.sort((a, b) => a.disagreement - b.disagreement || a.conflicts - b.conflicts || a.min - b.min || a.mean - b.mean);
    const best = scored[0];
    const tie = withPrior
      ? scored[1].disagreement === best.disagreement
      : scored[1].conflicts === best.conflicts && scored[1].min === best.min;
    if (tie && zones.length > 1) {
      guessedDirectionZones.push(largest);
    }
    for (const z of zones) zoneBranch[z] = best.result.branch[z] + best.shift;
    flag(best.result.conflicts);
  }
  return { zoneBranch, zoneAmbiguous, conflicts, guessedDirectionZones, unseededComponents };
}
