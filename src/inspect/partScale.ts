/**
 * The pixel size from a part of known size (`--part-diameter MM`, `--part-width MM`): a round
 * part's diameter in pixels is the diameter of the disc of the film area's area, 2·√(A/π) (robust
 * to a ragged outline); a part's width is the film area's extent along the photo's rows (its
 * leftmost to rightmost film pixel, edges included).
 */
import { isFilmStatus } from '../map/mapImages.js';

export interface PartSize {
  readonly kind: 'diameter' | 'width';
  readonly sizeMm: number;
}

export interface PartScale {
  readonly pixelSizeUm: number;
  /** The part's size in pixels as measured on the film area. */
  readonly partPx: number;
  readonly kind: PartSize['kind'];
  readonly sizeMm: number;
  /** The film area's centroid (the part's centre), px. */
  readonly centreX: number;
  readonly centreY: number;
}

/** Film area pixels, their centroid and extent. */
export function filmAreaGeometry(status: Uint8Array, width: number, height: number): { areaPx: number; centreX: number; centreY: number; minX: number; maxX: number; minY: number; maxY: number } {
  let areaPx = 0;
  let sx = 0;
  let sy = 0;
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let y = 0, i = 0; y < height; y++) {
    for (let x = 0; x < width; x++, i++) {
      if (!isFilmStatus(status[i])) continue;
      areaPx++;
      sx += x;
      sy += y;
      if (x < minX) minX = x;
      if (x > maxX) maxX = x;
      if (y < minY) minY = y;
      if (y > maxY) maxY = y;
    }
  }
  return { areaPx, centreX: areaPx ? sx / areaPx : NaN, centreY: areaPx ? sy / areaPx : NaN, minX, maxX, minY, maxY };
}

/** The scale from the part, or null when the photo holds no film area. */
export function scaleFromPart(status: Uint8Array, width: number, height: number, part: PartSize): PartScale | null {
  const g = filmAreaGeometry(status, width, height);
  if (g.areaPx === 0) return null;
  const partPx = part.kind === 'diameter' ? 2 * Math.sqrt(g.areaPx / Math.PI) : g.maxX - g.minX + 1;
  return { pixelSizeUm: (part.sizeMm * 1000) / partPx, partPx, kind: part.kind, sizeMm: part.sizeMm, centreX: g.centreX, centreY: g.centreY };
}
