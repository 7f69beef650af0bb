/**
 * Splits the film into slope zones and extreme bands, the units of fringe counting.
 *
 * With u = normalised reflectance (0 at a dark fringe, 1 at a bright one), pixels with
 * u > 1 − ε form bright bands, u < ε dark bands, the rest slope pixels. Inside one connected
 * slope zone the thickness stays on one monotonic branch of R(h): the branch can only change
 * where R passes an extreme, i.e. inside a band. Bands are 8-connected and zones 4-connected
 * (the usual pairing of digital topology), so a band one pixel wide along a diagonal still
 * separates two zones. A thickness turning point (dome, dimple) lies inside a zone and needs no
 * band. Zones smaller than `minZonePx` (noise specks near extremes) are left out of the graph.
 */

export const CLASS_NONE = 0;
export const CLASS_SLOPE = 1;
export const CLASS_BRIGHT = 2;
export const CLASS_DARK = 3;

export interface FringeSegments {
  /** Zone id per pixel (−1 for band / unusable / tiny zone pixels). */
  readonly zoneOf: Int32Array;
  readonly zoneArea: Int32Array;
  /** Band id per pixel (−1 otherwise). */
  readonly bandOf: Int32Array;
  /** +1 bright, −1 dark per band. */
  readonly bandKind: Int8Array;
  readonly bandArea: Int32Array;
  /** Zones touching each band, and bands touching each zone. */
  readonly bandZones: number[][];
  readonly zoneBands: number[][];
}

/** Connected components of pixels where `member(p)` holds; returns labels and areas. */
function label(
  width: number,
  height: number,
  member: (p: number) => boolean,
  eight: boolean,
  sameGroup: (p: number, q: number) => boolean,
): { labels: Int32Array; areas: number[] } {
  const n = width * height;
  const labels = new Int32Array(n).fill(-1);
  const areas: number[] = [];
  const stack = new Int32Array(n);
  for (let start = 0; start < n; start++) {
    if (labels[start] !== -1 || !member(start)) continue;
    const id = areas.length;
    let top = 0;
    stack[top++] = start;
    labels[start] = id;
    let area = 0;
    while (top > 0) {
      const p = stack[--top];
      area++;
      const x = p % width;
      const y = (p - x) / width;
      for (let dy = -1; dy <= 1; dy++) {
        for (let dx = -1; dx <= 1; dx++) {
          if ((dx === 0 && dy === 0) || (!eight && dx !== 0 && dy !== 0)) continue;
          const nx = x + dx;
          const ny = y + dy;
          if (nx < 0 || ny < 0 || nx >= width || ny >= height) continue;
          const q = ny * width + nx;
          if (labels[q] !== -1 || !member(q) || !sameGroup(p, q)) continue;
          labels[q] = id;
          stack[top++] = q;
        }
      }
    }
    areas.push(area);
  }
  return { labels, areas };
}

/** Classifies pixels of the normalised level `u` (NaN or unusable → none). */
export function classifyLevels(u: Float32Array, usable: Uint8Array, bandLevel: number): Uint8Array {
  const cls = new Uint8Array(u.length);
  for (let p = 0; p < u.length; p++) {
    if (!usable[p] || Number.isNaN(u[p])) continue;
    cls[p] = u[p] > 1 - bandLevel ? CLASS_BRIGHT : u[p] < bandLevel ? CLASS_DARK : CLASS_SLOPE;
  }
  return cls;
}

export function segmentFringes(cls: Uint8Array, width: number, height: number, minZonePx: number): FringeSegments {
  const zones = label(width, height, (p) => cls[p] === CLASS_SLOPE, false, () => true);
  const isBand = (p: number): boolean => cls[p] === CLASS_BRIGHT || cls[p] === CLASS_DARK;
  const bands = label(width, height, isBand, true, (p, q) => cls[p] === cls[q]);
  // Renumber zones, dropping the tiny ones.
  const zoneIndex = new Int32Array(zones.areas.length).fill(-1);
  const zoneArea: number[] = [];
  zones.areas.forEach((area, id) => {
    if (area >= minZonePx) {
      zoneIndex[id] = zoneArea.length;
      zoneArea.push(area);
    }
  });
  const n = width * height;
  const zoneOf = new Int32Array(n).fill(-1);
  for (let p = 0; p < n; p++) if (zones.labels[p] >= 0) zoneOf[p] = zoneIndex[zones.labels[p]];
  const bandCount = bands.areas.length;
  const bandKind = new Int8Array(bandCount);
  const bandZoneSets: Set<number>[] = Array.from({ length: bandCount }, () => new Set<number>());
  for (let p = 0; p < n; p++) {
    const b = bands.labels[p];
    if (b < 0) continue;
    bandKind[b] = cls[p] === CLASS_BRIGHT ? 1 : -1;
    const x = p % width;
    const y = (p - x) / width;
    for (let dy = -1; dy <= 1; dy++) {
      for (let dx = -1; dx <= 1; dx++) {
        const nx = x + dx;
        const ny = y + dy;
        if (nx < 0 || ny < 0 || nx >= width || ny >= height) continue;
        const z = zoneOf[ny * width + nx];
        if (z >= 0) bandZoneSets[b].add(z);
      }
    }
  }
  const bandZones = bandZoneSets.map((s) => [...s]);
  const zoneBands: number[][] = Array.from({ length: zoneArea.length }, () => []);
  bandZones.forEach((list, b) => list.forEach((z) => zoneBands[z].push(b)));
  return {
    zoneOf,
    zoneArea: Int32Array.from(zoneArea),
    bandOf: bands.labels,
    bandKind,
    bandArea: Int32Array.from(bands.areas),
    bandZones,
    zoneBands,
  };
}
