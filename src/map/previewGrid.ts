/**
 * The pixel grid of a preview image (`map.png`, `flags.png`): the map itself when its long side is
 * at most `PREVIEW_MAX_SIDE_PX`, else every `step`-th pixel of every `step`-th row, the smallest
 * whole step that brings the long side within the limit. A whole step keeps each preview pixel one
 * pixel of the map (point sampling: the colours are thicknesses that were measured, never blends
 * of them); the full resolution lives in the `.npy` and `.tif` outputs.
 */
import { type PhotoPixels, pixelFloats, valueAt } from './photoPixels.js';

export const PREVIEW_MAX_SIDE_PX = 2000;

export interface PreviewGrid {
  /** Map pixels per preview pixel along each axis (1 = full size). */
  readonly step: number;
  readonly width: number;
  readonly height: number;
  /** Index into the map of each preview pixel, row by row (null when step is 1). */
  readonly pixels: Int32Array | null;
}

export function previewGrid(width: number, height: number, maxSidePx = PREVIEW_MAX_SIDE_PX): PreviewGrid {
  const step = Math.max(1, Math.ceil(Math.max(width, height) / maxSidePx));
  if (step === 1) return { step, width, height, pixels: null };
  const w = Math.ceil(width / step);
  const h = Math.ceil(height / step);
  const pixels = new Int32Array(w * h);
  for (let y = 0, k = 0; y < h; y++) for (let x = 0; x < w; x++, k++) pixels[k] = y * step * width + x * step;
  return { step, width: w, height: h, pixels };
}

/**
 * Per preview pixel, a nonzero label of its `step` × `step` block of the map when the block holds
 * one (the first found, row by row), else 0: a thin region smaller than the step still shows in
 * the preview (max pooling, not point sampling, for what flags rupture risk). `boxes`, when given,
 * are the bounding boxes `[x, y, width, height]` of every labelled region (each nonzero label lies
 * in its region's box): only blocks that meet a box are read, the rest of a mostly unlabelled map
 * is never touched.
 */
export function poolLabels(labels: Int32Array, width: number, height: number, grid: PreviewGrid, boxes: readonly (readonly number[])[] | null = null): Int32Array {
  if (grid.step === 1) return labels;
  const out = new Int32Array(grid.width * grid.height);
  const s = grid.step;
  // Blocks to read: all, or those meeting a region's box.
  let wanted: Uint8Array | null = null;
  if (boxes) {
    wanted = new Uint8Array(grid.width * grid.height);
    for (const [x, y, w, h] of boxes) {
      const gx1 = Math.min(grid.width - 1, Math.floor((x + w - 1) / s));
      const gy1 = Math.min(grid.height - 1, Math.floor((y + h - 1) / s));
      for (let gy = Math.max(0, Math.floor(y / s)); gy <= gy1; gy++) wanted.fill(1, gy * grid.width + Math.max(0, Math.floor(x / s)), gy * grid.width + gx1 + 1);
    }
  }
  for (let gy = 0, k = 0; gy < grid.height; gy++) {
    const y1 = Math.min(height, (gy + 1) * s);
    for (let gx = 0; gx < grid.width; gx++, k++) {
      if (wanted && wanted[k] === 0) continue;
      const x1 = Math.min(width, (gx + 1) * s);
      let found = 0;
      for (let y = gy * s; y < y1 && found === 0; y++) {
        for (let x = gx * s; x < x1; x++) {
          const l = labels[y * width + x];
          if (l !== 0) {
            found = l;
            break;
          }
        }
      }
      out[k] = found;
    }
  }
  return out;
}

/** The values of `values` (`channels` per pixel) at the preview's pixels. */
export function samplePreview<T extends Float32Array | Uint8Array>(values: T, grid: PreviewGrid, channels = 1): T {
  if (!grid.pixels) return values;
  const out = new (values.constructor as { new (length: number): T })(grid.pixels.length * channels);
  for (let k = 0; k < grid.pixels.length; k++) {
    const i = grid.pixels[k] * channels;
    for (let c = 0; c < channels; c++) out[k * channels + c] = values[i + c];
  }
  return out;
}

/**
 * The photo's colours at the preview's pixels, as floats (./photoPixels.ts); all of them (as
 * floats) when the grid is the photo itself. A loop of its own: one loop over both typed-array
 * kinds read and wrote them polymorphically (about 50 ns a pixel on the 12-MP photo's preview).
 */
export function samplePhotoPreview(photo: PhotoPixels, grid: PreviewGrid): Float32Array {
  if (!grid.pixels) return pixelFloats(photo);
  const pixels = grid.pixels;
  const out = new Float32Array(pixels.length * 3);
  for (let k = 0; k < pixels.length; k++) {
    const i = pixels[k] * 3;
    out[k * 3] = valueAt(photo, i);
    out[k * 3 + 1] = valueAt(photo, i + 1);
    out[k * 3 + 2] = valueAt(photo, i + 2);
  }
  return out;
}

