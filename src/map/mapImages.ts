/**
 * The two picture outputs of a map:
 * - `<stem>.map.png`: the thickness map in the "strata" colour scale (colourScale.ts), with a
 *   colour bar in nm beside it and, when the pixel size is known, a scale bar; too-dark pixels
 *   ("thinner than the dark limit, or no film") are black, pixels without an estimate a flat grey,
 *   pixels found not to be film a pale hatch over light grey ("/"), undecided dark pixels a dark
 *   hatch over the same grey ("\"), pixels outside the region or mask white;
 * - `<stem>.flags.png`: the photo with the thin regions outlined in a saturated orange-red with
 *   a dark edge, a pair that stands out on interference colours of any hue, and the film area's
 *   outline as a thin dashed line of cyan and black (a pattern no film colour has).
 */
import { composeImagePng } from '../io/composeImage.js';
import { colourScaleBytes, SCALE_ENTRIES } from './colourScale.js';
import { type MapResult, PixelStatus } from './types.js';
import { okValuesOnStride, percentileSelect } from './statistics.js';
import { escapeHtml } from '../report/escapeHtml.js';
import { poolLabels, previewGrid, samplePhotoPreview, samplePreview } from './previewGrid.js';
import type { PhotoPixels } from './photoPixels.js';

const NO_ESTIMATE: readonly [number, number, number] = [128, 128, 128];
const TOO_DARK: readonly [number, number, number] = [0, 0, 0];
/** Not film: a pale "/" hatch over a light neutral grey. */
const NOT_FILM_BASE = 212;
const NOT_FILM_LINE = 244;
/** Undecided (black film or background): a dark "\" hatch over the same grey. */
const UNDECIDED_LINE = 96;
/** The film area's outline on the flags image: dashes of these two colours. */
export const FILM_OUTLINE_DASH: readonly [readonly [number, number, number], readonly [number, number, number]] = [[0, 224, 255], [0, 0, 0]];
/** The thin regions' outline on the flags image (its dark rim is [20, 20, 20]). */
export const THIN_OUTLINE: readonly [number, number, number] = [255, 64, 16];

/** True for a pixel of the film area: every status but outside region/mask, not film and undecided. */
export function isFilmStatus(code: number): boolean {
  return code !== PixelStatus.excluded && code !== PixelStatus.notFilm && code !== PixelStatus.undecided;
}

/** Hatch period in pixels of a raster of this size: visible when the picture is shown whole. */
export function hatchPeriodPx(width: number, height: number): number {
  return Math.max(6, Math.round(Math.max(width, height) / 120));
}

export interface ScaleRange {
  readonly minNm: number;
  readonly maxNm: number;
}

/** Ranges already found, per map (the map images and the report both need it). */
const rangeOf = new WeakMap<MapResult, ScaleRange>();

/** Colour-bar range: the 0.5th–99.5th percentile of the estimates, widened to round numbers. */
export function scaleRangeOf(result: MapResult): ScaleRange {
  let range = rangeOf.get(result);
  if (!range) {
    range = findScaleRange(result);
    rangeOf.set(result, range);
  }
  return range;
}

function findScaleRange(result: MapResult): ScaleRange {
  // Percentiles of about 500k estimates on a regular stride (plenty for a colour bar).
  const sample = okValuesOnStride(result.thicknessNm, result.status, 500_000);
  if (sample.length === 0) return { minNm: 0, maxNm: 100 };
  return roundedRange(percentileSelect(sample, 0.5), percentileSelect(sample, 99.5));
}

/** A colour-bar range from `lo` to `hi` nm widened to round numbers (about 5 steps). */
export function roundedRange(lo: number, hi: number): ScaleRange {
  const step = niceStep(Math.max(hi - lo, 1) / 5);
  const minNm = Math.floor(lo / step) * step;
  let maxNm = Math.ceil(hi / step) * step;
  if (maxNm <= minNm) maxNm = minNm + step;
  return { minNm, maxNm };
}

export function niceStep(raw: number): number {
  const magnitude = Math.pow(10, Math.floor(Math.log10(raw)));
  for (const f of [1, 2, 2.5, 5, 10]) if (f * magnitude >= raw) return f * magnitude;
  return 10 * magnitude;
}

/**
 * RGB bytes of the thickness map alone (no annotations): of every pixel, or of the pixels listed
 * in `pixels` (indices into the map), in that order. The hatches of "not film" and "undecided"
 * follow the output raster, `rasterWidth` pixels wide (default the map's width).
 */
export function mapRaster(result: MapResult, range: ScaleRange, pixels?: Int32Array, rasterWidth = result.width): Uint8Array {
  const { thicknessNm, status } = result;
  const scale = colourScaleBytes();
  const n = pixels ? pixels.length : status.length;
  const out = new Uint8Array(n * 3);
  const span = range.maxNm - range.minNm;
  const top = SCALE_ENTRIES - 1;
  const period = hatchPeriodPx(rasterWidth, Math.ceil(n / rasterWidth));
  const lineWidth = Math.max(1, Math.round(period / 4));
  for (let k = 0; k < n; k++) {
    const i = pixels ? pixels[k] : k;
    const s = status[i];
    let r: number;
    let g: number;
    let b: number;
    if (s === PixelStatus.ok) {
      let t = ((thicknessNm[i] - range.minNm) / span) * top;
      t = t < 0 ? 0 : t > top ? top : t;
      const c = ((t + 0.5) | 0) * 3; // t ≥ 0: the same as Math.round, cheaper
      r = scale[c];
      g = scale[c + 1];
      b = scale[c + 2];
    } else if (s === PixelStatus.dark) {
      r = TOO_DARK[0];
      g = TOO_DARK[1];
      b = TOO_DARK[2];
    } else if (s === PixelStatus.excluded) {
      r = 255;
      g = 255;
      b = 255;
    } else if (s === PixelStatus.notFilm || s === PixelStatus.undecided) {
      const x = k % rasterWidth;
      const y = (k - x) / rasterWidth;
      // "/" lines for not film, "\" lines for undecided ((x − y) mod period, kept ≥ 0).
      const phase = s === PixelStatus.notFilm ? (x + y) % period : (period + (x % period) - (y % period)) % period;
      const v = phase < lineWidth ? (s === PixelStatus.notFilm ? NOT_FILM_LINE : UNDECIDED_LINE) : NOT_FILM_BASE;
      r = v;
      g = v;
      b = v;
    } else {
      r = NO_ESTIMATE[0];
      g = NO_ESTIMATE[1];
      b = NO_ESTIMATE[2];
    }
    out[k * 3] = r;
    out[k * 3 + 1] = g;
    out[k * 3 + 2] = b;
  }
  return out;
}

/** Longest colour bar beside a map, pixels (well inside the SVG rasteriser's 32767-pixel side). */
const MAX_BAR_PX = 16000;

/** Where the map PNG puts its parts (canvas pixels), for a map of `width` × `height`. */
export interface MapPngLayout {
  readonly unit: number;
  readonly margin: number;
  readonly top: number;
  readonly barWidth: number;
  readonly canvasWidth: number;
  readonly canvasHeight: number;
  readonly panelLeft: number;
  /** Baseline of the first legend row; row k's text sits at legendY + 1.1·unit·k. */
  readonly legendY: number;
  /** The legend's swatches, in order: too dark, no estimate, then not film and undecided when present. */
  readonly swatches: ReadonlyArray<{ readonly key: 'dark' | 'noEstimate' | 'notFilm' | 'undecided'; readonly left: number; readonly top: number; readonly size: number }>;
}

export function mapPngLayout(width: number, height: number, present: { readonly notFilm: boolean; readonly undecided: boolean }): MapPngLayout {
  const unit = Math.max(12, Math.round(Math.min(width, height) / 28));
  const margin = Math.round(unit * 0.8);
  const barWidth = Math.round(unit * 1.4);
  const panel = margin * 2 + barWidth + unit * 8;
  const top = unit * 2;
  const canvasWidth = width + margin + panel;
  const keys: Array<MapPngLayout['swatches'][number]['key']> = ['dark', 'noEstimate'];
  if (present.notFilm) keys.push('notFilm');
  if (present.undecided) keys.push('undecided');
  // Tall enough for the legend below the colour bar.
  const canvasHeight = Math.max(height + top + margin, height + top + Math.ceil(unit * (0.7 + 1.1 * keys.length)), unit * 16);
  const legendY = Math.min(canvasHeight - unit * (1.2 + 1.1 * (keys.length - 2)), top + height + unit * 1.4);
  const panelLeft = width + margin;
  const swatches = keys.map((key, k) => ({ key, left: panelLeft + margin, top: legendY + unit * 1.1 * k - unit * 0.7, size: unit * 0.8 }));
  return { unit, margin, top, barWidth, canvasWidth, canvasHeight, panelLeft, legendY, swatches };
}

/**
 * The map picture: the thickness in the colour scale with title, colour bar, legend and (with a
 * pixel size) a scale bar; a photo larger than the preview limit is drawn on its preview grid
 * (./previewGrid.ts: every step-th pixel, the long side at most 2,000 px), the scale and the PNG's
 * pixel size following the step.
 */
export async function renderMapPng(result: MapResult, range: ScaleRange, pixelSizeUmFull: number | null, title: string, outlineMask: Uint8Array | null = null): Promise<Buffer> {
  const grid = previewGrid(result.width, result.height);
  const { width, height } = grid;
  const pixelSizeUm = pixelSizeUmFull !== null ? pixelSizeUmFull * grid.step : null;
  const present = statusesPresent(result.status);
  const { unit, margin, top, barWidth, canvasWidth, canvasHeight, panelLeft, legendY } = mapPngLayout(width, height, present);
  // The SVG rasteriser refuses pictures over 32767 pixels a side: beside a very tall photo the
  // colour bar stops at MAX_BAR_PX, so the preview never limits which photos can be mapped.
  const barHeight = Math.min(height, MAX_BAR_PX);
  const tall = barHeight < height;
  const barLayout = tall ? mapPngLayout(width, barHeight, present) : null;
  const panelHeight = barLayout ? barLayout.canvasHeight : canvasHeight;
  // Small overlays at their places: drawing canvas-sized SVGs would cost more than the map.
  const overlays: Array<{ svg: string; left: number; top: number }> = [
    { svg: titleSvg(Math.min(canvasWidth, unit * 60), top, unit, title), left: 0, top: 0 },
    { svg: colourBarSvg(canvasWidth - panelLeft, panelHeight, margin, top, barWidth, barHeight, range, unit, result.darkLimitNm, present, barLayout ? barLayout.legendY : legendY), left: panelLeft, top: 0 },
  ];
  if (pixelSizeUm !== null && pixelSizeUm > 0) overlays.push(scaleBarSvg(margin, top, width, height, pixelSizeUm, unit));
  return composeImagePng({
    canvasWidth,
    canvasHeight,
    background: '#ffffff',
    image: { data: withMaskOutline(grid.pixels ? mapRaster(result, range, grid.pixels, width) : mapRaster(result, range), outlineMask, grid.pixels, width, height), width, height, channels: 3 },
    imageLeft: margin,
    imageTop: top,
    overlays,
    pixelSizeUm: pixelSizeUm !== null && pixelSizeUm > 0 ? pixelSizeUm : null,
  });
}

/** The right-hand panel (its own size, placed beside the map): colour bar, ticks, legend. */
function colourBarSvg(
  panelWidth: number,
  panelHeight: number,
  left: number,
  top: number,
  barWidth: number,
  barHeight: number,
  range: ScaleRange,
  unit: number,
  darkLimitNm: number,
  present: { readonly notFilm: boolean; readonly undecided: boolean },
  legendY: number,
): string {
  const scale = colourScaleBytes();
  const stops: string[] = [];
  // Top of the bar = thickest; SVG gradient stops must come in increasing offset.
  for (let s = 32; s >= 0; s--) {
    const k = Math.round((s / 32) * (SCALE_ENTRIES - 1)) * 3;
    const hex = `#${[scale[k], scale[k + 1], scale[k + 2]].map((v) => v.toString(16).padStart(2, '0')).join('')}`;
    stops.push(`<stop offset="${(100 - (s / 32) * 100).toFixed(2)}%" stop-color="${hex}"/>`);
  }
  const step = niceStep((range.maxNm - range.minNm) / 6);
  const ticks: string[] = [];
  const first = Math.ceil(range.minNm / step);
  for (let i = first; i * step <= range.maxNm + 1e-9; i++) {
    const nm = i * step;
    const y = top + barHeight - ((nm - range.minNm) / (range.maxNm - range.minNm)) * barHeight;
    ticks.push(
      `<line x1="${left + barWidth}" y1="${y.toFixed(1)}" x2="${left + barWidth + unit * 0.4}" y2="${y.toFixed(1)}" stroke="#222" stroke-width="1"/>` +
        `<text x="${left + barWidth + unit * 0.6}" y="${(y + unit * 0.35).toFixed(1)}">${formatNm(nm)}</text>`,
    );
  }
  // Hatched swatches drawn like the map's pixels: "/" pale lines (not film), "\" dark lines (undecided).
  const p = Math.max(3, Math.round(unit * 0.27));
  const lw = Math.max(1, Math.round(p / 4));
  const grey = (v: number): string => `rgb(${v},${v},${v})`;
  const hatch = (id: string, angle: number, line: number): string =>
    `<pattern id="${id}" patternUnits="userSpaceOnUse" width="${p}" height="${p}" patternTransform="rotate(${angle})">` +
    `<rect width="${p}" height="${p}" fill="${grey(NOT_FILM_BASE)}"/><rect width="${lw}" height="${p}" fill="${grey(line)}"/></pattern>`;
  const legend: string[] = [];
  const entry = (fill: string, label: string): void => {
    const y = legendY + unit * 1.1 * (legend.length + 2);
    legend.push(
      `<rect x="${left}" y="${y - unit * 0.7}" width="${unit * 0.8}" height="${unit * 0.8}" fill="${fill}" stroke="#888" stroke-width="0.5"/>` +
        `<text x="${left + unit}" y="${y}" font-size="${unit * 0.6}">${label}</text>`,
    );
  };
  if (present.notFilm) entry('url(#hatch-not-film)', 'not film');
  if (present.undecided) entry('url(#hatch-undecided)', 'undecided: film or not');
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${panelWidth}" height="${panelHeight}" font-family="DejaVu Sans, sans-serif" font-size="${unit * 0.8}" fill="#222">
<defs><linearGradient id="bar" x1="0" y1="0" x2="0" y2="1">${stops.join('')}</linearGradient>${hatch('hatch-not-film', 45, NOT_FILM_LINE)}${hatch('hatch-undecided', -45, UNDECIDED_LINE)}</defs>
<rect x="${left}" y="${top}" width="${barWidth}" height="${barHeight}" fill="url(#bar)" stroke="#222" stroke-width="1"/>
<text x="${left}" y="${top - unit * 0.4}">nm</text>
${ticks.join('\n')}
<rect x="${left}" y="${legendY - unit * 0.7}" width="${unit * 0.8}" height="${unit * 0.8}" fill="#000"/>
<text x="${left + unit}" y="${legendY}" font-size="${unit * 0.6}">${darkLimitNm > 0 ? `&lt; ${formatNm(darkLimitNm)} nm or no film` : 'darker than any film'}</text>
<rect x="${left}" y="${legendY + unit * 0.4}" width="${unit * 0.8}" height="${unit * 0.8}" fill="rgb(128,128,128)"/>
<text x="${left + unit}" y="${legendY + unit * 1.1}" font-size="${unit * 0.6}">no estimate</text>
${legend.join('\n')}
</svg>`;
}

/**
 * The outline of the pixels set in `mask` (full size; e.g. the out-of-spec area, src/inspect)
 * painted into the map raster (`pixels`: the full-size pixel of each raster pixel, or null when
 * the raster is the full map) in dashes of white and black (OUT_OF_SPEC_DASH), one pixel wide.
 */
export function withMaskOutline(raster: Uint8Array, mask: Uint8Array | null, pixels: Int32Array | null | undefined, width: number, height: number): Uint8Array {
  if (!mask) return raster;
  const at = (x: number, y: number): number => mask[pixels ? pixels[y * width + x] : y * width + x];
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      if (!at(x, y)) continue;
      const edge = (x > 0 && !at(x - 1, y)) || (x < width - 1 && !at(x + 1, y)) || (y > 0 && !at(x, y - 1)) || (y < height - 1 && !at(x, y + 1));
      if (!edge) continue;
      const c = OUT_OF_SPEC_DASH[(((x + y) / 4) | 0) & 1];
      const o = (y * width + x) * 3;
      raster[o] = c;
      raster[o + 1] = c;
      raster[o + 2] = c;
    }
  }
  return raster;
}

/** The out-of-spec outline on the map picture: dashes of white and black. */
export const OUT_OF_SPEC_DASH: readonly [number, number] = [255, 0];

/** Whether any pixel is "not film" or "undecided" (their legend entries appear only then). */
export function statusesPresent(status: Uint8Array): { notFilm: boolean; undecided: boolean } {
  let notFilm = false;
  let undecided = false;
  for (let i = 0; i < status.length; i++) {
    const s = status[i];
    if (s === PixelStatus.notFilm) notFilm = true;
    else if (s === PixelStatus.undecided) undecided = true;
    else continue;
    if (notFilm && undecided) break;
  }
  return { notFilm, undecided };
}

/** The title strip across the top (its own size, placed at the canvas origin). */
function titleSvg(width: number, height: number, unit: number, title: string): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" font-family="DejaVu Sans, sans-serif" fill="#222">
<text x="${unit * 0.8}" y="${unit * 1.3}" font-size="${unit}" font-weight="bold">${escapeHtml(title)}</text>
</svg>`;
}

/** The scale bar in the map's lower-left corner, as a small document and its place on the canvas. */
function scaleBarSvg(
  left: number,
  top: number,
  width: number,
  height: number,
  pixelSizeUm: number,
  unit: number,
): { svg: string; left: number; top: number } {
  const targetUm = (width * pixelSizeUm) / 5;
  const lengthUm = niceStep(targetUm);
  const lengthPx = lengthUm / pixelSizeUm;
  const label = lengthUm >= 1000 ? `${formatNm(lengthUm / 1000)} mm` : `${formatNm(lengthUm)} µm`;
  // Canvas position of the bar, and of the box behind it (whole pixels).
  const x = left + unit * 0.6;
  const y = top + height - unit * 0.9;
  const boxLeft = Math.floor(x - unit * 0.3);
  const boxTop = Math.floor(y - unit * 1.2);
  const boxWidth = Math.ceil(lengthPx + unit * 0.6) + 1;
  const boxHeight = Math.ceil(unit * 1.7) + 1;
  const lx = x - boxLeft;
  const ly = y - boxTop;
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${boxWidth}" height="${boxHeight}" font-family="DejaVu Sans, sans-serif" font-size="${unit * 0.7}">
<rect x="${lx - unit * 0.3}" y="${ly - unit * 1.2}" width="${lengthPx + unit * 0.6}" height="${unit * 1.7}" fill="#ffffff" fill-opacity="0.8" rx="3"/>
<rect x="${lx}" y="${ly}" width="${lengthPx.toFixed(1)}" height="${Math.max(3, unit * 0.25)}" fill="#111"/>
<text x="${lx}" y="${ly - unit * 0.25}" fill="#111">${label}</text>
</svg>`;
  return { svg, left: boxLeft, top: boxTop };
}

function formatNm(value: number): string {
  return Number.isInteger(value) ? String(value) : value.toFixed(Math.abs(value) < 10 ? 1 : 0);
}

/**
 * Film pixels on the film area's edge: a film pixel with a 4-neighbour that is not film (the
 * photo's own border is no edge). Empty when the whole picture is film, or none of it is.
 */
export function filmEdge(status: Uint8Array, width: number, height: number): Uint8Array {
  const edge = new Uint8Array(width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (!isFilmStatus(status[i])) continue;
      if (
        (x > 0 && !isFilmStatus(status[i - 1])) || (x < width - 1 && !isFilmStatus(status[i + 1])) ||
        (y > 0 && !isFilmStatus(status[i - width])) || (y < height - 1 && !isFilmStatus(status[i + width]))
      ) edge[i] = 1;
    }
  }
  return edge;
}

/**
 * Paints the film area's outline into an RGB raster (`width` × `height`, 3 bytes a pixel): the
 * edge pixels of `filmEdge`, widened inwards to `lineWidth` pixels, in dashes of cyan and black
 * (`FILM_OUTLINE_DASH`) `dashPx` long along the outline.
 */
export function paintFilmOutline(out: Uint8Array, status: Uint8Array, width: number, height: number, lineWidth = 1, dashPx = 6): void {
  const edge = filmEdge(status, width, height);
  const reach = lineWidth - 1;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      if (!edge[y * width + x]) continue;
      for (let dy = -reach; dy <= reach; dy++) {
        for (let dx = -reach; dx <= reach; dx++) {
          const nx = x + dx;
          const ny = y + dy;
          if (nx < 0 || ny < 0 || nx >= width || ny >= height) continue;
          const j = ny * width + nx;
          if (!isFilmStatus(status[j])) continue;
          const c = FILM_OUTLINE_DASH[((((x + y) / dashPx) | 0) & 1)];
          out[j * 3] = c[0];
          out[j * 3 + 1] = c[1];
          out[j * 3 + 2] = c[2];
        }
      }
    }
  }
}

/**
 * The photo (encoded 0..1 RGB) with the outlines of labelled thin regions and, when the pixel
 * statuses are given, the film area's outline (thin, dashed cyan and black; under the thin
 * regions' outlines where they meet).
 */
export async function renderFlagsPng(
  rgbFull: PhotoPixels,
  widthFull: number,
  heightFull: number,
  labelsFull: Int32Array,
  statusFull?: Uint8Array,
  pixelSizeUmFull: number | null = null,
  /** Bounding boxes of the labelled regions (see poolLabels): a large photo's labels are read only there. */
  regionBoxes: readonly (readonly number[])[] | null = null,
): Promise<Buffer> {
  // A large photo is drawn on its preview grid (./previewGrid.ts); a thin region smaller than the
  // grid's step still shows (its label is pooled over each block).
  const grid = previewGrid(widthFull, heightFull);
  const { width, height } = grid;
  const rgb = samplePhotoPreview(rgbFull, grid);
  const labels = poolLabels(labelsFull, widthFull, heightFull, grid, regionBoxes);
  const status = statusFull ? samplePreview(statusFull, grid) : undefined;
  const pixelSizeUm = pixelSizeUmFull !== null ? pixelSizeUmFull * grid.step : null;
  const out = new Uint8Array(width * height * 3);
  // rgb ∈ [0, 1]: (v·255 + 0.5) | 0 is Math.round(v·255), cheaper over tens of millions of values.
  for (let i = 0, n = width * height * 3; i < n; i++) out[i] = (rgb[i] * 255 + 0.5) | 0;
  const thickness = Math.max(1, Math.round(Math.min(width, height) / 300));
  if (status) {
    const lineWidth = Math.max(1, Math.round(Math.min(width, height) / 600));
    paintFilmOutline(out, status, width, height, lineWidth, Math.max(6, lineWidth * 6));
  }
  const edge = new Uint8Array(width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (labels[i] === 0) continue;
      const l = labels[i];
      if (
        x === 0 || y === 0 || x === width - 1 || y === height - 1 ||
        labels[i - 1] !== l || labels[i + 1] !== l || labels[i - width] !== l || labels[i + width] !== l
      ) edge[i] = 1;
    }
  }
  // Dilate the edge by `thickness` pixels outwards and inwards; dark rim one pixel further.
  const paint = (i: number, r: number, g: number, b: number): void => {
    out[i * 3] = r;
    out[i * 3 + 1] = g;
    out[i * 3 + 2] = b;
  };
  const rim = thickness + 1;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      if (!edge[y * width + x]) continue;
      for (let dy = -rim; dy <= rim; dy++) {
        for (let dx = -rim; dx <= rim; dx++) {
          const nx = x + dx;
          const ny = y + dy;
          if (nx < 0 || ny < 0 || nx >= width || ny >= height) continue;
          const d = Math.max(Math.abs(dx), Math.abs(dy));
          const j = ny * width + nx;
          if (d <= thickness) paint(j, THIN_OUTLINE[0], THIN_OUTLINE[1], THIN_OUTLINE[2]);
          else if (!edge[j]) paint(j, 20, 20, 20);
        }
      }
    }
  }
  // Re-paint the core so the dark rim never covers the bright line.
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      if (!edge[y * width + x]) continue;
      for (let dy = -thickness; dy <= thickness; dy++) {
        for (let dx = -thickness; dx <= thickness; dx++) {
          const nx = x + dx;
          const ny = y + dy;
          if (nx < 0 || ny < 0 || nx >= width || ny >= height) continue;
          paint(ny * width + nx, THIN_OUTLINE[0], THIN_OUTLINE[1], THIN_OUTLINE[2]);
        }
      }
    }
  }
  return composeImagePng({
    canvasWidth: width,
    canvasHeight: height,
    background: '#000000',
    image: { data: out, width, height, channels: 3 },
    imageLeft: 0,
    imageTop: 0,
    overlays: [],
    pixelSizeUm: pixelSizeUm !== null && pixelSizeUm > 0 ? pixelSizeUm : null,
  });
}
