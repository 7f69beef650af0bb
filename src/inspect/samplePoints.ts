/**
 * Thickness at points (`--points FILE.csv`, `--points polar:N`) and along lines (`--profile
 * X0,Y0,X1,Y1`). A point's thickness is the mean over the measured pixels of a small disc around
 * it, with their sample standard deviation; a line is sampled at steps of one pixel (at most),
 * each sample the value of the pixel it falls in (the map's own values, not interpolated).
 */
import { UsageError } from '../errors.js';
import { PixelStatus } from '../map/types.js';

export interface PointRequest {
  readonly label: string;
  readonly x: number;
  readonly y: number;
  /** `px`: photo pixels (x right, y down from the top-left corner); `mm`: from the part's centre, x right, y up. */
  readonly unit: 'px' | 'mm';
}

/** `--points`: a list (from a CSV file) or the polar pattern: the centre plus `rings` rings, ring k of 8·k points. */
export type PointsRequest =
  | { readonly kind: 'list'; readonly points: readonly PointRequest[]; readonly source: string }
  | { readonly kind: 'polar'; readonly rings: number };

export interface PointSample {
  readonly label: string;
  readonly xPx: number;
  readonly yPx: number;
  readonly xMm: number | null;
  readonly yMm: number | null;
  /** Mean over the disc's measured pixels, nm (null when none is measured). */
  readonly thicknessNm: number | null;
  readonly stdNm: number | null;
  /** Measured pixels in the disc, and all pixels of it. */
  readonly measuredPx: number;
  readonly discPx: number;
}

/** A point or line outside the photo: a usage error for the whole run (not one failed photo). */
export class OutsidePhotoError extends UsageError {}

export interface Frame {
  readonly width: number;
  readonly height: number;
  readonly thicknessNm: Float32Array;
  readonly status: Uint8Array;
}

export interface PartFrame {
  /** The part's centre (film area centroid), px; NaN when no film. */
  readonly centreX: number;
  readonly centreY: number;
  /** Radius of the part's usable area (after edge exclusion), px. */
  readonly usableRadiusPx: number;
  readonly pixelSizeUm: number | null;
}

/** Parses the CSV of `--points`: a header `x_px,y_px` or `x_mm,y_mm` (an optional `label` column), then one point a row. */
export function parsePointsCsv(text: string, source: string): PointsRequest {
  const lines = text.split(/\r?\n/).map((l) => l.trim()).filter((l) => l.length > 0 && !l.startsWith('#'));
  if (lines.length < 2) throw new UsageError(`--points ${source}: expected a header (x_px,y_px or x_mm,y_mm, optional label) and at least one point`);
  const header = lines[0].split(',').map((h) => h.trim().toLowerCase());
  const xi = header.findIndex((h) => h === 'x_px' || h === 'x_mm');
  const yi = header.findIndex((h) => h === 'y_px' || h === 'y_mm');
  if (xi < 0 || yi < 0) throw new UsageError(`--points ${source}: the header must name x_px,y_px (pixels) or x_mm,y_mm (mm from the part's centre, y up), received ${JSON.stringify(lines[0])}`);
  const unit = header[xi] === 'x_mm' ? 'mm' : 'px';
  if ((header[yi] === 'y_mm' ? 'mm' : 'px') !== unit) throw new UsageError(`--points ${source}: x and y must be in the same unit (x_px,y_px or x_mm,y_mm)`);
  const li = header.indexOf('label');
  const points: PointRequest[] = [];
  for (let r = 1; r < lines.length; r++) {
    const cells = lines[r].split(',').map((c) => c.trim());
    const x = Number(cells[xi]);
    const y = Number(cells[yi]);
    if (cells[xi] === '' || cells[yi] === '' || !Number.isFinite(x) || !Number.isFinite(y)) {
      throw new UsageError(`--points ${source}: row ${r + 1} is not a point (${JSON.stringify(lines[r])})`);
    }
    points.push({ label: li >= 0 && cells[li] ? cells[li] : `P${r}`, x, y, unit });
  }
  return { kind: 'list', points, source };
}

/** Parses `polar:N` (N rings, 1 to 20). */
export function parsePolar(text: string): PointsRequest | null {
  const m = /^polar:(\d+)$/i.exec(text.trim());
  if (!m) return null;
  const rings = Number(m[1]);
  if (!(rings >= 1 && rings <= 20)) throw new UsageError(`--points polar:N takes N from 1 to 20 rings, received ${JSON.stringify(text)}`);
  return { kind: 'polar', rings };
}

/** Where the points lie in the photo, px (a usage error when one lies outside it). */
export function resolvePoints(request: PointsRequest, frame: Pick<Frame, 'width' | 'height'>, part: PartFrame, sampleRadiusPx: number): Array<{ label: string; xPx: number; yPx: number }> {
  const out: Array<{ label: string; xPx: number; yPx: number }> = [];
  if (request.kind === 'polar') {
    if (!Number.isFinite(part.centreX)) return out;
    const outer = Math.max(0, part.usableRadiusPx - sampleRadiusPx);
    out.push({ label: 'C', xPx: part.centreX, yPx: part.centreY });
    for (let k = 1; k <= request.rings; k++) {
      const r = (outer * k) / request.rings;
      const count = 8 * k;
      for (let j = 0; j < count; j++) {
        const a = (2 * Math.PI * j) / count;
        out.push({ label: `R${k}-${j + 1}`, xPx: part.centreX + r * Math.cos(a), yPx: part.centreY - r * Math.sin(a) });
      }
    }
    return out;
  }
  for (const p of request.points) {
    let xPx = p.x;
    let yPx = p.y;
    if (p.unit === 'mm') {
      if (part.pixelSizeUm === null) throw new UsageError(`--points ${request.source}: points in mm need a scale (--pixel-size, --part-diameter or --part-width)`);
      if (!Number.isFinite(part.centreX)) throw new UsageError(`--points ${request.source}: points in mm are taken from the part's centre, and no film area was found`);
      xPx = part.centreX + (p.x * 1000) / part.pixelSizeUm;
      yPx = part.centreY - (p.y * 1000) / part.pixelSizeUm;
    }
    if (!(xPx >= -0.5 && yPx >= -0.5 && xPx < frame.width - 0.5 && yPx < frame.height - 0.5)) {
      throw new OutsidePhotoError(`--points ${request.source}: point ${p.label} (${p.x}, ${p.y} ${p.unit}) lies outside the ${frame.width}×${frame.height} photo`);
    }
    out.push({ label: p.label, xPx, yPx });
  }
  return out;
}

/** Mean and spread of the measured pixels within `radiusPx` of each point. */
export function samplePoints(frame: Frame, points: ReadonlyArray<{ label: string; xPx: number; yPx: number }>, radiusPx: number, part: PartFrame): PointSample[] {
  const { width, height, thicknessNm, status } = frame;
  const r = Math.max(0.5, radiusPx);
  const reach = Math.ceil(r);
  return points.map((p) => {
    const cx = Math.round(p.xPx);
    const cy = Math.round(p.yPx);
    let n = 0;
    let disc = 0;
    let sum = 0;
    let sum2 = 0;
    for (let y = cy - reach; y <= cy + reach; y++) {
      if (y < 0 || y >= height) continue;
      for (let x = cx - reach; x <= cx + reach; x++) {
        if (x < 0 || x >= width || (x - p.xPx) ** 2 + (y - p.yPx) ** 2 > r * r) continue;
        disc++;
        const i = y * width + x;
        if (status[i] !== PixelStatus.ok) continue;
        const v = thicknessNm[i];
        n++;
        sum += v;
        sum2 += v * v;
      }
    }
    const mean = n > 0 ? sum / n : null;
    const std = n > 1 && mean !== null ? Math.sqrt(Math.max(0, (sum2 - n * mean * mean) / (n - 1))) : n === 1 ? 0 : null;
    const mm = part.pixelSizeUm !== null && Number.isFinite(part.centreX);
    return {
      label: p.label,
      xPx: p.xPx,
      yPx: p.yPx,
      xMm: mm ? ((p.xPx - part.centreX) * part.pixelSizeUm!) / 1000 : null,
      yMm: mm ? ((part.centreY - p.yPx) * part.pixelSizeUm!) / 1000 : null,
      thicknessNm: mean,
      stdNm: std,
      measuredPx: n,
      discPx: disc,
    };
  });
}

export interface ProfileLine {
  readonly x0: number;
  readonly y0: number;
  readonly x1: number;
  readonly y1: number;
}

export interface ProfileSample {
  /** Distance along the line from its start, px. */
  readonly distancePx: number;
  /** The pixel sampled (the one the point at that distance falls in). */
  readonly xPx: number;
  readonly yPx: number;
  readonly thicknessNm: number | null;
  readonly confidence: number;
  readonly status: number;
}

/** Parses `X0,Y0,X1,Y1` (pixels). */
export function parseProfile(text: string): ProfileLine {
  const parts = text.split(',').map((s) => s.trim());
  const v = parts.map(Number);
  if (parts.length !== 4 || parts.some((p) => p === '') || v.some((n) => !Number.isFinite(n))) {
    throw new UsageError(`--profile must be X0,Y0,X1,Y1 in pixels (e.g. 10,200,470,200), received ${JSON.stringify(text)}`);
  }
  if (v[0] === v[2] && v[1] === v[3]) throw new UsageError(`--profile: the line's two ends are the same point, received ${JSON.stringify(text)}`);
  return { x0: v[0], y0: v[1], x1: v[2], y1: v[3] };
}

/** Samples the map along a line every pixel of length, from (x0, y0) to (x1, y1). */
export function sampleProfile(frame: Frame & { readonly confidence: Float32Array }, line: ProfileLine, name = '--profile'): ProfileSample[] {
  const { width, height } = frame;
  for (const [x, y] of [[line.x0, line.y0], [line.x1, line.y1]]) {
    if (!(x >= 0 && y >= 0 && x <= width - 1 && y <= height - 1)) {
      throw new OutsidePhotoError(`${name} ${line.x0},${line.y0},${line.x1},${line.y1}: the end (${x}, ${y}) lies outside the ${width}×${height} photo`);
    }
  }
  const length = Math.hypot(line.x1 - line.x0, line.y1 - line.y0);
  const steps = Math.max(1, Math.ceil(length));
  const out: ProfileSample[] = [];
  for (let k = 0; k <= steps; k++) {
    const t = k / steps;
    const x = line.x0 + t * (line.x1 - line.x0);
    const y = line.y0 + t * (line.y1 - line.y0);
    const px = Math.round(x);
    const py = Math.round(y);
    const i = py * width + px;
    const s = frame.status[i];
    out.push({ distancePx: t * length, xPx: px, yPx: py, thicknessNm: s === PixelStatus.ok ? frame.thicknessNm[i] : null, confidence: frame.confidence[i], status: s });
  }
  return out;
}
