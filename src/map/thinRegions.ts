/**
 * Thin (rupture-risk) regions: 8-connected components of film pixels that are either measured
 * below the thin threshold or too dark to measure (thinner than the dark limit, or no film).
 * Components smaller than `minAreaPx` are ignored as noise.
 *
 * Labelling by runs (common practice for connected components of a raster): each row's runs of
 * thin pixels are joined to the runs of the row above that touch them (8-connectivity: overlap
 * widened by one pixel) in a union–find over runs; each component's area, centroid, bounding box
 * and minimum are summed from its runs. The map is read once; only thin pixels' labels are
 * written. Region ids follow each component's first pixel in raster order, from 1.
 */
import { PixelStatus, type ThinRegion } from './types.js';

export interface ThinRegionResult {
  readonly regions: ThinRegion[];
  /** Per-pixel region id (0 = none, else id). */
  readonly labels: Int32Array;
}

/**
 * Growable run storage (start, end exclusive, row), the union–find parent of each run and the
 * least measured thickness in it (Infinity when none of its pixels is measured).
 */
class Runs {
  start = new Int32Array(1024);
  end = new Int32Array(1024);
  row = new Int32Array(1024);
  parent = new Int32Array(1024);
  least = new Float64Array(1024);
  count = 0;

  add(start: number, end: number, row: number, least: number): number {
    if (this.count === this.start.length) {
      const size = this.count * 2;
      this.start = grow(this.start, size);
      this.end = grow(this.end, size);
      this.row = grow(this.row, size);
      this.parent = grow(this.parent, size);
      const least = new Float64Array(size);
      least.set(this.least);
      this.least = least;
    }
    const k = this.count++;
    this.start[k] = start;
    this.end[k] = end;
    this.row[k] = row;
    this.parent[k] = k;
    this.least[k] = least;
    return k;
  }
}

function grow(array: Int32Array, size: number): Int32Array<ArrayBuffer> {
  const grown = new Int32Array(size);
  grown.set(array);
  return grown;
}

/** The root of run `k` (path halving). */
function rootOf(parent: Int32Array, k: number): number {
  while (parent[k] !== k) {
    parent[k] = parent[parent[k]];
    k = parent[k];
  }
  return k;
}

/** Joins two runs' components; the root is the one with the earlier first run (raster order). */
function join(parent: Int32Array, a: number, b: number): void {
  const ra = rootOf(parent, a);
  const rb = rootOf(parent, b);
  if (ra < rb) parent[rb] = ra;
  else if (rb < ra) parent[ra] = rb;
}

export function findThinRegions(
  thicknessNm: Float32Array,
  status: Uint8Array,
  width: number,
  height: number,
  thinBelowNm: number | null,
  pixelSizeUm: number | null,
  minAreaPx = 5,
): ThinRegionResult {
  const labels = new Int32Array(width * height);
  const regions: ThinRegion[] = [];
  if (thinBelowNm === null) return { regions, labels };
  const runs = new Runs();
  let previousFirst = 0;
  let previousEnd = 0;
  for (let y = 0; y < height; y++) {
    const rowStart = y * width;
    const first = runs.count;
    let above = previousFirst;
    let x = 0;
    while (x < width) {
      while (x < width && !isThin(thicknessNm, status, rowStart + x, thinBelowNm)) x++;
      if (x === width) break;
      const start = x;
      // The run (isThin, inlined), with the least thickness measured in it.
      let least = Infinity;
      for (; x < width; x++) {
        const i = rowStart + x;
        const s = status[i];
        if (s === PixelStatus.dark) continue;
        if (s !== PixelStatus.ok || !(thicknessNm[i] < thinBelowNm)) break;
        if (thicknessNm[i] < least) least = thicknessNm[i];
      }
      const k = runs.add(start, x, y, least);
      // Runs of the row above touching [start − 1, x]: skip those ending before start − 1.
      while (above < previousEnd && runs.end[above] < start) above++;
      for (let a = above; a < previousEnd && runs.start[a] <= x; a++) join(runs.parent, a, k);
    }
    previousFirst = first;
    previousEnd = runs.count;
  }
  // Components in the order of their first run (a root is its component's first run).
  const { start, end, row, parent, least, count } = runs;
  const slotOf = new Int32Array(count).fill(-1);
  const area: number[] = [];
  const sumX: number[] = [];
  const sumY: number[] = [];
  const minThickness: number[] = [];
  const box: number[] = [];
  for (let k = 0; k < count; k++) {
    const root = rootOf(parent, k);
    let slot = slotOf[root];
    if (slot < 0) {
      slot = slotOf[root] = area.length;
      area.push(0);
      sumX.push(0);
      sumY.push(0);
      minThickness.push(Infinity);
      box.push(width, height, -1, -1);
    }
    const s = start[k];
    const e = end[k];
    const y = row[k];
    const length = e - s;
    area[slot] += length;
    sumX[slot] += ((s + e - 1) * length) / 2;
    sumY[slot] += y * length;
    if (least[k] < minThickness[slot]) minThickness[slot] = least[k];
    const b = slot * 4;
    if (s < box[b]) box[b] = s;
    if (y < box[b + 1]) box[b + 1] = y;
    if (e - 1 > box[b + 2]) box[b + 2] = e - 1;
    if (y > box[b + 3]) box[b + 3] = y;
  }
  // Kept components are numbered from 1 in that order; too small ones get no id.
  const idOf = new Int32Array(area.length);
  for (let slot = 0; slot < area.length; slot++) {
    if (area[slot] < minAreaPx) continue;
    const id = regions.length + 1;
    idOf[slot] = id;
    const b = slot * 4;
    regions.push({
      id,
      areaPx: area[slot],
      areaUm2: pixelSizeUm === null ? null : area[slot] * pixelSizeUm * pixelSizeUm,
      centroidX: sumX[slot] / area[slot],
      centroidY: sumY[slot] / area[slot],
      minThicknessNm: minThickness[slot] === Infinity ? null : minThickness[slot],
      bbox: [box[b], box[b + 1], box[b + 2] - box[b] + 1, box[b + 3] - box[b + 1] + 1],
    });
  }
  for (let k = 0; k < count; k++) {
    const id = idOf[slotOf[rootOf(parent, k)]];
    if (id !== 0) labels.fill(id, row[k] * width + start[k], row[k] * width + end[k]);
  }
  return { regions, labels };
}

function isThin(thicknessNm: Float32Array, status: Uint8Array, i: number, thinBelowNm: number): boolean {
  const s = status[i];
  return s === PixelStatus.dark || (s === PixelStatus.ok && thicknessNm[i] < thinBelowNm);
}
