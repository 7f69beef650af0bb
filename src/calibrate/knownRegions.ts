/**
 * Colour statistics of the known-thickness rectangles of a calibration photo: the per-channel
 * median of the encoded values (robust to dust and edge pixels), the standard error of that
 * colour, and the share of clipped pixels. Rectangles must lie inside the photo and be non-empty.
 */
import { UsageError } from '../errors.js';

export interface KnownRegion {
  /** x, y, width, height in pixels. */
  readonly region: readonly [number, number, number, number];
  readonly thicknessNm: number;
}

export interface KnownRegionColour extends KnownRegion {
  /** Median encoded colour (0..1). */
  readonly colour: [number, number, number];
  /** Standard error of the median colour per channel (encoded units). */
  readonly standardError: [number, number, number];
  readonly pixels: number;
  /** Share of pixels with a channel at or above 254.5/255 (or below 0.5/255). */
  readonly clippedFraction: number;
}

const CLIP_HIGH = 254.5 / 255;
const CLIP_LOW = 0.5 / 255;

export function knownRegionColours(
  rgb: Float32Array,
  width: number,
  height: number,
  known: readonly KnownRegion[],
): KnownRegionColour[] {
  if (known.length === 0) throw new UsageError('--known is required at least once: X,Y,W,H=NM (a rectangle of known thickness)');
  return known.map((k) => {
    const [x0, y0, w, h] = k.region;
    if (!k.region.every(Number.isInteger)) throw new UsageError(`--known ${k.region.join(',')}=${k.thicknessNm}: X, Y, W and H must be whole numbers of pixels`);
    if (!(w > 0 && h > 0)) throw new UsageError(`--known ${k.region.join(',')}=${k.thicknessNm}: the rectangle has zero size`);
    if (x0 < 0 || y0 < 0 || x0 + w > width || y0 + h > height) {
      throw new UsageError(`--known ${k.region.join(',')}=${k.thicknessNm}: the rectangle lies outside the ${width}×${height} photo`);
    }
    const n = w * h;
    const channels = [new Float32Array(n), new Float32Array(n), new Float32Array(n)];
    let clipped = 0;
    let m = 0;
    for (let y = y0; y < y0 + h; y++) {
      for (let x = x0; x < x0 + w; x++) {
        const i = (y * width + x) * 3;
        let isClipped = false;
        for (let c = 0; c < 3; c++) {
          const v = rgb[i + c];
          channels[c][m] = v;
          if (v >= CLIP_HIGH || v <= CLIP_LOW) isClipped = true;
        }
        if (isClipped) clipped++;
        m++;
      }
    }
    const colour: [number, number, number] = [0, 0, 0];
    const standardError: [number, number, number] = [0, 0, 0];
    for (let c = 0; c < 3; c++) {
      const sorted = channels[c].sort();
      colour[c] = sorted[Math.floor(n / 2)];
      const mad = Math.abs(sorted[Math.floor(n * 0.75)] - sorted[Math.floor(n * 0.25)]) / 1.349;
      // Standard error of the median ≈ 1.2533·σ/√n (Kendall & Stuart; common practice).
      standardError[c] = (1.2533 * mad) / Math.sqrt(n);
    }
    return { ...k, colour, standardError, pixels: n, clippedFraction: clipped / n };
  });
}
