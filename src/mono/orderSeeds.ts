/**
 * Where fringe counting starts: user anchors (a pixel of known thickness), the previous frame of a
 * series (`zonePriorBranches`) and, without anchors, a black film (a large, uniformly dark region of a film whose reflectance is a minimum at zero
 * thickness = order 0; common practice in foam-film work).
 *
 * Black-film test (our choice of thresholds): a dark band covering at least 1 % of the film whose
 * interior (pixels 3 px or more inside the band) has, in the 5 × 5 smoothed level, a mean below
 * 0.012 (a Newton black film of ~5 nm reflects ~0.5 % of the peak; thicker black films are not
 * recognised) and a spread of about the smoothed noise (≤ 0.3 · noise + 0.0015). The interior of a
 * dark fringe crossed by a gentle thickness gradient climbs from 0 (mean ~0.015 or more) and keeps
 * a larger spread. The test is a heuristic: give an anchor when it matters.
 */
import type { Anchor } from '../map/types.js';
import type { FringeSegments } from './fringeSegments.js';
import { branchOfThickness, type LineReflectanceTable } from './lineReflectanceTable.js';
import type { ZoneSeed } from './zoneBranches.js';

/** Nearest zone to pixel p (square rings outwards, up to `maxRadius` px); −1 if none. */
function nearestZone(seg: FringeSegments, width: number, height: number, p: number, maxRadius: number): number {
  const x0 = p % width;
  const y0 = (p - x0) / width;
  if (seg.zoneOf[p] >= 0) return seg.zoneOf[p];
  for (let r = 1; r <= maxRadius; r++) {
    let best = -1;
    let bestD = Infinity;
    for (let y = Math.max(0, y0 - r); y <= Math.min(height - 1, y0 + r); y++) {
      for (let x = Math.max(0, x0 - r); x <= Math.min(width - 1, x0 + r); x++) {
        if (Math.max(Math.abs(x - x0), Math.abs(y - y0)) !== r) continue;
        const z = seg.zoneOf[y * width + x];
        const d = (x - x0) ** 2 + (y - y0) ** 2;
        if (z >= 0 && d < bestD) {
          best = z;
          bestD = d;
        }
      }
    }
    if (best >= 0) return best;
  }
  return -1;
}

export function anchorSeeds(
  anchors: readonly Anchor[],
  seg: FringeSegments,
  table: LineReflectanceTable,
  width: number,
  height: number,
  usable: Uint8Array,
  warnings: string[],
): ZoneSeed[] {
  const seeds: ZoneSeed[] = [];
  for (const a of anchors) {
    const label = `anchor ${a.x},${a.y}=${a.thicknessNm}`;
    if (!Number.isInteger(a.x) || !Number.isInteger(a.y) || a.x < 0 || a.y < 0 || a.x >= width || a.y >= height) {
      throw new RangeError(`${label}: x,y must be integer pixel coordinates inside the ${width}×${height} photo`);
    }
    if (!Number.isFinite(a.thicknessNm) || a.thicknessNm < 0) {
      throw new RangeError(`${label}: thicknessNm must be a finite number >= 0, received ${a.thicknessNm}`);
    }
    const branch = branchOfThickness(table, a.thicknessNm);
    if (branch < 0) {
      throw new RangeError(`${label}: thicknessNm must not exceed the largest thickness considered (${((table.reflectance.length - 1) * table.stepNm).toFixed(0)} nm)`);
    }
    const p = a.y * width + a.x;
    if (!usable[p]) {
      warnings.push(`${label} lies outside the film or on a clipped pixel and was not used`);
      continue;
    }
    const zone = nearestZone(seg, width, height, p, Math.max(width, height));
    if (zone < 0) {
      warnings.push(`${label}: no fringe zone near the anchor, not used`);
      continue;
    }
    seeds.push({ zone, branch });
  }
  return seeds;
}

const RIM_PROBES: ReadonlyArray<readonly [number, number]> = [
  [3, 0], [-3, 0], [0, 3], [0, -3], [2, 2], [2, -2], [-2, 2], [-2, -2],
];

/** Seeds from the largest black film found, with a warning naming where it is; [] if none. */
export function blackFilmSeeds(
  seg: FringeSegments,
  /** Normalised level, 5 × 5 smoothed. */
  level: Float32Array,
  width: number,
  height: number,
  usablePixels: number,
  noiseLevel: number,
  warnings: string[],
): ZoneSeed[] {
  const count = seg.bandArea.length;
  const sum = new Float64Array(count);
  const sumSq = new Float64Array(count);
  const interior = new Float64Array(count);
  const sx = new Float64Array(count);
  const sy = new Float64Array(count);
  const n = level.length;
  for (let p = 0; p < n; p++) {
    const b = seg.bandOf[p];
    if (b < 0 || seg.bandKind[b] > 0) continue;
    sx[b] += p % width;
    sy[b] += Math.floor(p / width);
    // Level statistics from pixels at least 3 px inside the band only: near the rim the 5 × 5
    // smoothing mixes in the neighbouring film.
    const x = p % width;
    const y = (p - x) / width;
    if (x < 3 || x >= width - 3 || y < 3 || y >= height - 3) continue;
    let inside = true;
    for (const [dx, dy] of RIM_PROBES) if (seg.bandOf[p + dy * width + dx] !== b) inside = false;
    if (!inside) continue;
    interior[b]++;
    sum[b] += level[p];
    sumSq[b] += level[p] * level[p];
  }
  let best = -1;
  for (let b = 0; b < count; b++) {
    const area = seg.bandArea[b];
    if (seg.bandKind[b] > 0 || area < Math.max(25, 0.01 * usablePixels) || seg.bandZones[b].length === 0) continue;
    if (interior[b] < 0.25 * area) continue;
    const mean = sum[b] / interior[b];
    const spread = Math.sqrt(Math.max(0, sumSq[b] / interior[b] - mean * mean));
    if (mean > 0.012 || spread > 0.3 * noiseLevel + 0.0015) continue;
    if (best < 0 || area > seg.bandArea[best]) best = b;
  }
  if (best < 0) return [];
  const area = seg.bandArea[best];
  warnings.push(
    `no anchor given: the uniformly dark region around (${Math.round(sx[best] / area)}, ${Math.round(sy[best] / area)}) (${area} px) was taken as black film, fringe order 0`,
  );
  return seg.bandZones[best].map((zone) => ({ zone, branch: 0 }));
}

/**
 * Branch each zone had in the previous frame of a series: the branch of the zone's mean prior
 * thickness (NaN where the prior has no estimate on the zone); null when the prior covers no zone.
 */
export function zonePriorBranches(seg: FringeSegments, prior: Float32Array, table: LineReflectanceTable): Float64Array | null {
  const zoneCount = seg.zoneArea.length;
  const sum = new Float64Array(zoneCount);
  const count = new Float64Array(zoneCount);
  for (let p = 0; p < prior.length; p++) {
    const z = seg.zoneOf[p];
    if (z < 0 || !Number.isFinite(prior[p])) continue;
    sum[z] += prior[p];
    count[z]++;
  }
  const out = new Float64Array(zoneCount).fill(NaN);
  let any = false;
  for (let z = 0; z < zoneCount; z++) {
    // A zone counts when the prior covers at least half of it.
    if (count[z] < 0.5 * seg.zoneArea[z]) continue;
    const branch = branchOfThickness(table, sum[z] / count[z]);
    if (branch < 0) continue;
    out[z] = branch;
    any = true;
  }
  return any ? out : null;
}
