/**
 * Thin (rupture-risk) regions: 8-connected components of film pixels that are either measured
 * below the thin threshold or too dark to measure (thinner than the dark limit, or no film).
 * Components smaller than `minAreaPx` are ignored as noise. Labelling is a two-pass-free
 * flood fill with an explicit typed-array stack (no recursion, no allocation per pixel).
 */
import { PixelStatus, type ThinRegion } from './types.js';

export interface ThinRegionResult {
  readonly regions: ThinRegion[];
  /** Per-pixel region id (0 = none, else id). */
  readonly labels: Int32Array;
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
  const cells = width * height;
  const labels = new Int32Array(cells);
  const regions: ThinRegion[] = [];
  if (thinBelowNm === null) return { regions, labels };
  const isThin = (i: number): boolean =>
    status[i] === PixelStatus.dark || (status[i] === PixelStatus.ok && thicknessNm[i] < thinBelowNm);
  // The flood fill's stack grows with the largest region seen (doubling), not with the photo:
  // a second photo-sized array would cost 48 MB on a 12-MP photo.
  let stack = new Int32Array(Math.min(cells, 1 << 16));
  let nextId = 1;
  for (let seed = 0; seed < cells; seed++) {
    if (labels[seed] !== 0 || !isThin(seed)) continue;
    const id = nextId;
    let top = 0;
    stack[top++] = seed;
    labels[seed] = id;
    let area = 0;
    let sumX = 0;
    let sumY = 0;
    let minThickness = Infinity;
    let x0 = width;
    let y0 = height;
    let x1 = -1;
    let y1 = -1;
    while (top > 0) {
      const i = stack[--top];
      const x = i % width;
      const y = (i - x) / width;
      area++;
      sumX += x;
      sumY += y;
      if (status[i] === PixelStatus.ok && thicknessNm[i] < minThickness) minThickness = thicknessNm[i];
      if (x < x0) x0 = x;
      if (x > x1) x1 = x;
      if (y < y0) y0 = y;
      if (y > y1) y1 = y;
      for (let dy = -1; dy <= 1; dy++) {
        const ny = y + dy;
        if (ny < 0 || ny >= height) continue;
        for (let dx = -1; dx <= 1; dx++) {
          const nx = x + dx;
          if ((dx === 0 && dy === 0) || nx < 0 || nx >= width) continue;
          const n = ny * width + nx;
          if (labels[n] === 0 && isThin(n)) {
            labels[n] = id;
            if (top === stack.length) {
              const grown = new Int32Array(Math.min(cells, stack.length * 2));
              grown.set(stack);
              stack = grown;
            }
            stack[top++] = n;
          }
        }
      }
    }
    if (area < minAreaPx) {
      relabel(labels, seed, id, -1, width, height);
      continue;
    }
    nextId++;
    regions.push({
      id,
      areaPx: area,
      areaUm2: pixelSizeUm === null ? null : area * pixelSizeUm * pixelSizeUm,
      centroidX: sumX / area,
      centroidY: sumY / area,
      minThicknessNm: minThickness === Infinity ? null : minThickness,
      bbox: [x0, y0, x1 - x0 + 1, y1 - y0 + 1],
    });
  }
  for (let i = 0; i < cells; i++) if (labels[i] < 0) labels[i] = 0;
  return { regions, labels };
}

/** Marks a too-small component with `to` so it is neither re-seeded nor reported. */
function relabel(labels: Int32Array, seed: number, from: number, to: number, width: number, height: number): void {
  const stack: number[] = [seed];
  labels[seed] = to;
  while (stack.length > 0) {
    const i = stack.pop() as number;
    const x = i % width;
    const y = (i - x) / width;
    for (let dy = -1; dy <= 1; dy++) {
      for (let dx = -1; dx <= 1; dx++) {
        const nx = x + dx;
        const ny = y + dy;
        if (nx < 0 || ny < 0 || nx >= width || ny >= height) continue;
        const n = ny * width + nx;
        if (labels[n] === from) {
          labels[n] = to;
          stack.push(n);
        }
      }
    }
  }
}
