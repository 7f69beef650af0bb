/**
 * Local intensity of the brightest and darkest fringe across the photo, for uneven lighting
 * (vignetting, a lamp off-axis). The frame is cut into square cells; each cell with at least
 * `minSamples` bright (or dark) fringe pixels takes their median intensity, cells without enough
 * take the inverse-distance-squared mean of the cells that have them (common practice for
 * scattered data), and the pixel values are bilinear interpolations between cell centres.
 * With no sample at all, the envelope is the constant `fallback`.
 */

function cellMedians(
  samples: Int32Array,
  intensity: Float32Array,
  width: number,
  cellPx: number,
  cols: number,
  rows: number,
  minSamples: number,
  fallback: number,
): Float64Array {
  const lists: number[][] = Array.from({ length: cols * rows }, () => []);
  for (const p of samples) {
    const x = p % width;
    const y = (p - x) / width;
    lists[Math.min(rows - 1, Math.floor(y / cellPx)) * cols + Math.min(cols - 1, Math.floor(x / cellPx))].push(intensity[p]);
  }
  const value = new Float64Array(cols * rows).fill(NaN);
  lists.forEach((list, c) => {
    if (list.length < minSamples) return;
    list.sort((a, b) => a - b);
    const m = list.length >> 1;
    value[c] = list.length % 2 ? list[m] : 0.5 * (list[m - 1] + list[m]);
  });
  const known = [...value.keys()].filter((c) => !Number.isNaN(value[c]));
  const filled = new Float64Array(cols * rows);
  for (let c = 0; c < cols * rows; c++) {
    if (!Number.isNaN(value[c])) {
      filled[c] = value[c];
      continue;
    }
    if (known.length === 0) {
      filled[c] = fallback;
      continue;
    }
    let sw = 0;
    let sv = 0;
    for (const k of known) {
      const d2 = ((k % cols) - (c % cols)) ** 2 + (Math.floor(k / cols) - Math.floor(c / cols)) ** 2;
      sw += 1 / d2;
      sv += value[k] / d2;
    }
    filled[c] = sv / sw;
  }
  return filled;
}

/** Per-pixel envelope from fringe pixels `samples` (pixel indices) of `intensity`. */
export function intensityEnvelope(
  samples: Int32Array,
  intensity: Float32Array,
  width: number,
  height: number,
  cellPx: number,
  fallback: number,
  minSamples = 8,
): Float32Array {
  const cols = Math.max(1, Math.ceil(width / cellPx));
  const rows = Math.max(1, Math.ceil(height / cellPx));
  const cell = cellMedians(samples, intensity, width, cellPx, cols, rows, minSamples, fallback);
  const out = new Float32Array(width * height);
  for (let y = 0; y < height; y++) {
    const gy = Math.min(rows - 1, Math.max(0, (y + 0.5) / cellPx - 0.5));
    const r0 = Math.floor(gy);
    const r1 = Math.min(rows - 1, r0 + 1);
    const fy = gy - r0;
    for (let x = 0; x < width; x++) {
      const gx = Math.min(cols - 1, Math.max(0, (x + 0.5) / cellPx - 0.5));
      const c0 = Math.floor(gx);
      const c1 = Math.min(cols - 1, c0 + 1);
      const fx = gx - c0;
      const top = cell[r0 * cols + c0] * (1 - fx) + cell[r0 * cols + c1] * fx;
      const bottom = cell[r1 * cols + c0] * (1 - fx) + cell[r1 * cols + c1] * fx;
      out[y * width + x] = top * (1 - fy) + bottom * fy;
    }
  }
  return out;
}
