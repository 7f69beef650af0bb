/**
 * Image pyramid of a thickness grid with holes: each level is the one below smoothed with a
 * Gaussian (σ 1 px, normalised convolution so holes do not leak) and averaged over 2 × 2 blocks.
 * A cell of level l+1 at (x, y) sits at (2x + 0.5, 2y + 0.5) of level l. A cell is NaN when fewer
 * than half of its block had a value.
 */
import { blurWithHoles } from './gaussianBlur.js';
import type { Grid } from './grid.js';

export function halve(grid: Grid): Grid {
  const { width, height } = grid;
  const smooth = blurWithHoles(grid.data, width, height, 1).values;
  const w2 = Math.max(1, width >> 1);
  const h2 = Math.max(1, height >> 1);
  const out = new Float32Array(w2 * h2);
  for (let y = 0; y < h2; y++) {
    for (let x = 0; x < w2; x++) {
      let s = 0;
      let c = 0;
      for (let dy = 0; dy < 2; dy++) {
        const yy = Math.min(height - 1, 2 * y + dy);
        for (let dx = 0; dx < 2; dx++) {
          const v = smooth[yy * width + Math.min(width - 1, 2 * x + dx)];
          if (Number.isFinite(v)) {
            s += v;
            c++;
          }
        }
      }
      out[y * w2 + x] = c >= 2 ? s / c : NaN;
    }
  }
  return { data: out, width: w2, height: h2 };
}

/** Levels 0 (the grid itself) … up to `maxLevels - 1`, stopping before a side would drop below `minSidePx`. */
export function buildPyramid(grid: Grid, maxLevels: number, minSidePx: number): Grid[] {
  const levels: Grid[] = [grid];
  while (levels.length < maxLevels) {
    const top = levels[levels.length - 1];
    if ((top.width >> 1) < minSidePx || (top.height >> 1) < minSidePx) break;
    levels.push(halve(top));
  }
  return levels;
}
