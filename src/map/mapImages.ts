/**
 * The two picture outputs of a map:
 * - `<stem>.map.png`: the thickness map in the "strata" colour scale (colourScale.ts), with a
 *   colour bar in nm beside it and, when the pixel size is known, a scale bar; too-dark pixels
 *   ("thinner than the dark limit, or no film") are black, pixels without an estimate a flat grey;
 * - `<stem>.flags.png`: the photo with the thin regions outlined in a saturated orange-red with
 *   a dark edge, a pair that stands out on interference colours of any hue.
 */
import { composeImagePng } from '../io/composeImage.js';
import { colourScaleBytes, SCALE_ENTRIES } from './colourScale.js';
import { type MapResult, PixelStatus } from './types.js';
import { percentileSelect } from './statistics.js';
import { escapeHtml } from '../report/escapeHtml.js';

const NO_ESTIMATE: readonly [number, number, number] = [128, 128, 128];
const TOO_DARK: readonly [number, number, number] = [0, 0, 0];

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
  const { thicknessNm, status } = result;
  let n = 0;
  for (let i = 0; i < status.length; i++) if (status[i] === PixelStatus.ok) n++;
  if (n === 0) return { minNm: 0, maxNm: 100 };
  // Percentiles of at most ~500k estimates on a regular stride (plenty for a colour bar).
  const stride = Math.max(1, Math.floor(n / 500_000));
  const values = new Float32Array(Math.ceil(n / stride));
  let seen = 0;
  let m = 0;
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    if (seen++ % stride === 0) values[m++] = thicknessNm[i];
  }
  const sample = values.subarray(0, m);
  const lo = percentileSelect(sample, 0.5);
  const hi = percentileSelect(sample, 99.5);
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
 * in `pixels` (indices into the map), in that order.
 */
export function mapRaster(result: MapResult, range: ScaleRange, pixels?: Int32Array): Uint8Array {
  const { thicknessNm, status } = result;
  const scale = colourScaleBytes();
  const n = pixels ? pixels.length : status.length;
  const out = new Uint8Array(n * 3);
  const span = range.maxNm - range.minNm;
  const top = SCALE_ENTRIES - 1;
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

export async function renderMapPng(result: MapResult, range: ScaleRange, pixelSizeUm: number | null, title: string): Promise<Buffer> {
  const { width, height } = result;
  const unit = Math.max(12, Math.round(Math.min(width, height) / 28));
  const margin = Math.round(unit * 0.8);
  const barWidth = Math.round(unit * 1.4);
  const panel = margin * 2 + barWidth + unit * 8;
  const top = unit * 2;
  const canvasWidth = width + margin + panel;
  // Tall enough for the legend below the colour bar.
  const canvasHeight = Math.max(height + top + margin, height + top + Math.ceil(unit * 2.9), unit * 16);
  // Small overlays at their places: drawing canvas-sized SVGs would cost more than the map.
  const panelLeft = width + margin;
  // The SVG rasteriser refuses pictures over 32767 pixels a side: beside a very tall photo the
  // colour bar stops at MAX_BAR_PX, so the preview never limits which photos can be mapped.
  const barHeight = Math.min(height, MAX_BAR_PX);
  const panelHeight = barHeight === height ? canvasHeight : Math.max(barHeight + top + margin, barHeight + top + Math.ceil(unit * 2.9), unit * 16);
  const overlays: Array<{ svg: string; left: number; top: number }> = [
    { svg: titleSvg(Math.min(canvasWidth, unit * 60), top, unit, title), left: 0, top: 0 },
    { svg: colourBarSvg(canvasWidth - panelLeft, panelHeight, margin, top, barWidth, barHeight, range, unit, result.darkLimitNm), left: panelLeft, top: 0 },
  ];
  if (pixelSizeUm !== null && pixelSizeUm > 0) overlays.push(scaleBarSvg(margin, top, width, height, pixelSizeUm, unit));
  return composeImagePng({
    canvasWidth,
    canvasHeight,
    background: '#ffffff',
    image: { data: mapRaster(result, range), width, height, channels: 3 },
    imageLeft: margin,
    imageTop: top,
    overlays,
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
  const legendY = Math.min(panelHeight - unit * 1.2, top + barHeight + unit * 1.4);
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${panelWidth}" height="${panelHeight}" font-family="DejaVu Sans, sans-serif" font-size="${unit * 0.8}" fill="#222">
<defs><linearGradient id="bar" x1="0" y1="0" x2="0" y2="1">${stops.join('')}</linearGradient></defs>
<rect x="${left}" y="${top}" width="${barWidth}" height="${barHeight}" fill="url(#bar)" stroke="#222" stroke-width="1"/>
<text x="${left}" y="${top - unit * 0.4}">nm</text>
${ticks.join('\n')}
<rect x="${left}" y="${legendY - unit * 0.7}" width="${unit * 0.8}" height="${unit * 0.8}" fill="#000"/>
<text x="${left + unit}" y="${legendY}" font-size="${unit * 0.6}">${darkLimitNm > 0 ? `&lt; ${formatNm(darkLimitNm)} nm or no film` : 'darker than any film'}</text>
<rect x="${left}" y="${legendY + unit * 0.4}" width="${unit * 0.8}" height="${unit * 0.8}" fill="rgb(128,128,128)"/>
<text x="${left + unit}" y="${legendY + unit * 1.1}" font-size="${unit * 0.6}">no estimate</text>
</svg>`;
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

/** The photo (encoded 0..1 RGB) with the outlines of labelled thin regions. */
export async function renderFlagsPng(rgb: Float32Array, width: number, height: number, labels: Int32Array): Promise<Buffer> {
  const out = new Uint8Array(width * height * 3);
  // rgb ∈ [0, 1]: (v·255 + 0.5) | 0 is Math.round(v·255), cheaper over tens of millions of values.
  for (let i = 0, n = width * height * 3; i < n; i++) out[i] = (rgb[i] * 255 + 0.5) | 0;
  const thickness = Math.max(1, Math.round(Math.min(width, height) / 300));
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
          if (d <= thickness) paint(j, 255, 64, 16);
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
          paint(ny * width + nx, 255, 64, 16);
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
  });
}
