/**
 * Thin patches tracked over a series: per frame, the connected thin regions (below the thin
 * threshold, or too dark to measure; ../map/thinRegions.ts), linked frame to frame by moving each
 * patch's centroid with the mean flow inside it and taking the nearest unclaimed patch of the
 * next frame within a search radius (greedy, closest pairs first). Rise velocity of a patch at a
 * frame: the centroid's upward speed by central differences over its track (one-sided at the
 * ends), in px/s (or µm/s with a pixel size); image rows grow downwards, up is positive.
 */
import type { ThinRegion } from '../map/types.js';

export interface PatchFrame {
  readonly frame: string;
  readonly timeS: number;
  readonly regions: readonly ThinRegion[];
}

export interface PatchRow {
  readonly patch: number;
  readonly frame: string;
  readonly timeS: number;
  readonly areaPx: number;
  readonly areaUm2: number | null;
  readonly centroidXPx: number;
  readonly centroidYPx: number;
  readonly minThicknessNm: number | null;
  /** Centroid's upward velocity, length unit per second (null for a patch seen in one frame only). */
  readonly riseVelocityPerS: number | null;
}

/** Mean flow (px per frame) over the cells of region `id`, from a flow field; [0, 0] when none is known. */
export function meanFlowIn(labels: Int32Array, id: number, u: Float32Array, v: Float32Array): [number, number] {
  let su = 0;
  let sv = 0;
  let n = 0;
  for (let i = 0; i < labels.length; i++) {
    if (labels[i] !== id) continue;
    const a = u[i];
    const b = v[i];
    if (Number.isFinite(a) && Number.isFinite(b)) {
      su += a;
      sv += b;
      n++;
    }
  }
  return n === 0 ? [0, 0] : [su / n, sv / n];
}

/**
 * Links the patches of consecutive frames. `displacement(k, region)` gives the expected motion of
 * a region of frame k to frame k+1 in px (e.g. the mean flow inside it); `lengthPerPx` converts
 * centroid velocities to the output unit.
 */
export function trackPatches(
  frames: readonly PatchFrame[],
  displacement: (k: number, region: ThinRegion) => [number, number],
  lengthPerPx: number,
): PatchRow[] {
  const trackOf: Int32Array[] = frames.map((f) => new Int32Array(f.regions.length).fill(-1));
  let tracks = 0;
  for (let k = 0; k < frames.length; k++) {
    for (let r = 0; r < frames[k].regions.length; r++) if (trackOf[k][r] < 0) trackOf[k][r] = tracks++;
    if (k + 1 >= frames.length) break;
    const here = frames[k].regions;
    const next = frames[k + 1].regions;
    const pairs: Array<[number, number, number]> = [];
    for (let a = 0; a < here.length; a++) {
      const [dx, dy] = displacement(k, here[a]);
      const px = here[a].centroidX + dx;
      const py = here[a].centroidY + dy;
      const radius = Math.max(8, 1.5 * Math.sqrt(here[a].areaPx));
      for (let b = 0; b < next.length; b++) {
        const d = Math.hypot(next[b].centroidX - px, next[b].centroidY - py);
        if (d <= radius) pairs.push([d, a, b]);
      }
    }
    pairs.sort((p, q) => p[0] - q[0]);
    const usedA = new Uint8Array(here.length);
    const usedB = new Uint8Array(next.length);
    for (const [, a, b] of pairs) {
      if (usedA[a] || usedB[b]) continue;
      usedA[a] = 1;
      usedB[b] = 1;
      trackOf[k + 1][b] = trackOf[k][a];
    }
  }
  // Per track, its (frame, region) points in time order, then velocities.
  const byTrack = new Map<number, Array<[number, number]>>();
  for (let k = 0; k < frames.length; k++) {
    for (let r = 0; r < frames[k].regions.length; r++) {
      const t = trackOf[k][r];
      if (!byTrack.has(t)) byTrack.set(t, []);
      byTrack.get(t)!.push([k, r]);
    }
  }
  const rows: PatchRow[] = [];
  const ids = [...byTrack.keys()].sort((a, b) => a - b);
  ids.forEach((t, index) => {
    const points = byTrack.get(t)!;
    for (let j = 0; j < points.length; j++) {
      const [k, r] = points[j];
      const region = frames[k].regions[r];
      let rise: number | null = null;
      if (points.length > 1) {
        const [ka, ra] = points[Math.max(0, j - 1)];
        const [kb, rb] = points[Math.min(points.length - 1, j + 1)];
        const dt = frames[kb].timeS - frames[ka].timeS;
        if (dt > 0) rise = (-(frames[kb].regions[rb].centroidY - frames[ka].regions[ra].centroidY) * lengthPerPx) / dt;
      }
      rows.push({
        patch: index + 1,
        frame: frames[k].frame,
        timeS: frames[k].timeS,
        areaPx: region.areaPx,
        areaUm2: region.areaUm2,
        centroidXPx: region.centroidX,
        centroidYPx: region.centroidY,
        minThicknessNm: region.minThicknessNm,
        riseVelocityPerS: rise,
      });
    }
  });
  return rows.sort((a, b) => a.patch - b.patch || a.timeS - b.timeS);
}
