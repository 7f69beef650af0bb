/**
 * Caps: a band touching one zone only (the top of a dome or the bottom of a dimple near a fringe
 * extreme, or a plateau there). Band pixels take their zone's branch, which is right when the cap
 * stays on the zone's side of the extreme. When the cap's thickness passes the extreme, the
 * intensity goes through the extreme on a ring and turns back inside it (common practice in
 * reading Newton rings): the mean smoothed level of the cap, taken in layers by distance from the
 * zone, peaks (bright band) or dips (dark band) at the ring and comes back beyond it. Pixels of
 * layers beyond the ring then belong to the branch across the extreme. The turn-back must exceed
 * three times the noise of a layer mean and 0.01 of the fringe swing (our thresholds).
 */
import { growBreadthFirst } from './breadthFirst.js';
import type { FringeSegments } from './fringeSegments.js';
import type { PixelBranches } from './fillPixelBranches.js';
import { NO_BRANCH, branchAcross, type ZoneBranches } from './zoneBranches.js';

export function crossCaps(
  seg: FringeSegments,
  zones: ZoneBranches,
  pixels: PixelBranches,
  level: Float32Array,
  width: number,
  height: number,
  firstKind: number,
  noiseLevel: number,
): number {
  const n = width * height;
  const layer = new Int32Array(n).fill(-1);
  const queue = new Int32Array(n);
  let flipped = 0;
  for (let b = 0; b < seg.bandZones.length; b++) {
    if (seg.bandZones[b].length !== 1 || seg.bandArea[b] < 20) continue;
    const zone = seg.bandZones[b][0];
    const zoneBranch = zones.zoneBranch[zone];
    if (zoneBranch === NO_BRANCH || zones.zoneAmbiguous[zone]) continue;
    const across = branchAcross(zoneBranch, seg.bandKind[b], firstKind);
    if (across < 0) continue;
    // Layers: breadth-first from the band pixels touching the zone, inside the band only.
    let tail = 0;
    for (let p = 0; p < n; p++) {
      if (seg.bandOf[p] !== b) continue;
      const x = p % width;
      const y = (p - x) / width;
      const touches =
        (x > 0 && seg.zoneOf[p - 1] === zone) || (x < width - 1 && seg.zoneOf[p + 1] === zone) ||
        (y > 0 && seg.zoneOf[p - width] === zone) || (y < height - 1 && seg.zoneOf[p + width] === zone);
      if (touches) {
        layer[p] = 0;
        queue[tail++] = p;
      }
    }
    tail = growBreadthFirst(queue, tail, width, height, (from, to) => {
      if (seg.bandOf[to] !== b || layer[to] >= 0) return false;
      layer[to] = layer[from] + 1;
      return true;
    });
    const layers = tail > 0 ? layer[queue[tail - 1]] + 1 : 0;
    const sum = new Float64Array(layers);
    const count = new Float64Array(layers);
    for (let i = 0; i < tail; i++) {
      sum[layer[queue[i]]] += level[queue[i]];
      count[layer[queue[i]]]++;
    }
    const sign = seg.bandKind[b]; // +1: the extreme is a maximum of the level
    let crest = 0;
    for (let l = 1; l < layers; l++) if (sign * sum[l] / count[l] > sign * sum[crest] / count[crest]) crest = l;
    let deepest = crest;
    for (let l = crest + 1; l < layers; l++) if (sign * sum[l] / count[l] < sign * sum[deepest] / count[deepest]) deepest = l;
    const turnBack = sign * (sum[crest] / count[crest] - sum[deepest] / count[deepest]);
    const layerNoise = noiseLevel / Math.sqrt(Math.min(count[crest], count[deepest]));
    if (deepest > crest && turnBack > Math.max(3 * layerNoise, 0.01)) {
      for (let i = 0; i < tail; i++) {
        const p = queue[i];
        if (layer[p] <= crest) continue;
        pixels.branch[p] = across;
        flipped++;
      }
    }
    for (let i = 0; i < tail; i++) layer[queue[i]] = -1;
  }
  return flipped;
}
