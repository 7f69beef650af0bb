/**
 * An interference-colour chart as SVG, to print or hold next to a sample: the thickness axis is
 * cut into rows of equal span; each row is a band of colour swatches with nm ticks and labels
 * underneath, and the start of each interference order (../render/orderBoundaries.ts) marked by
 * a dark line and an "order n" tag above the band. Header: stack, light, angle, observer;
 * footer: how the chart was made and the cautions. Layout and palette are our own.
 */
import type { ChartTable } from './chartTable.js';

export interface ChartLabels {
  readonly title: string;
  /** Lines printed under the title (stack, light, angle …). */
  readonly details: readonly string[];
}

const WIDTH = 1240;
const MARGIN = 48;
const BAND_X = MARGIN + 92;
const BAND_WIDTH = WIDTH - BAND_X - MARGIN;
const BAND_HEIGHT = 64;
const ROW_HEIGHT = 138;
const FONT = "DejaVu Sans, Liberation Sans, Arial, sans-serif";
const INK = '#1f2328';
const MUTED = '#5b6168';
const PAPER = '#f6f4ef';

function escapeXml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** Span of thickness per chart row: the smallest of 50/100/250/500/1000/… nm giving ≤ 8 rows. */
export function nmPerChartRow(spanNm: number): number {
  const candidates = [20, 50, 100, 250, 500, 1000, 2500, 5000, 10000, 25000];
  return candidates.find((c) => Math.ceil(spanNm / c - 1e-9) <= 8) ?? Math.ceil(spanNm / 8);
}

function hex(table: ChartTable, i: number): string {
  const s = table.srgb8;
  return `#${[s[i * 3], s[i * 3 + 1], s[i * 3 + 2]].map((v) => v.toString(16).padStart(2, '0')).join('')}`;
}

function formatNm(value: number): string {
  return Number.isInteger(value) ? String(value) : value.toFixed(1);
}

interface ChartLayout {
  readonly fromNm: number;
  readonly toNm: number;
  readonly stepNm: number;
  readonly perRow: number;
  readonly rows: number;
  readonly pxPerNm: number;
  readonly headerHeight: number;
}

function chartLayout(table: ChartTable, detailLines: number): ChartLayout {
  const d = table.thicknessesNm;
  const n = d.length;
  const fromNm = d[0];
  const stepNm = n > 1 ? d[1] - d[0] : 1;
  const toNm = n > 1 ? d[n - 1] : fromNm + 1;
  const perRow = nmPerChartRow(toNm - fromNm);
  const rows = Math.max(1, Math.ceil((toNm - fromNm) / perRow - 1e-9));
  return { fromNm, toNm, stepNm, perRow, rows, pxPerNm: BAND_WIDTH / perRow, headerHeight: 66 + 20 * detailLines };
}

/** Pixel position (at density 72) of the middle of the swatch for `thicknessNm`: for tests and overlays. */
export function chartSwatchCentre(table: ChartTable, detailLines: number, thicknessNm: number): { x: number; y: number } {
  const { fromNm, perRow, rows, pxPerNm, headerHeight } = chartLayout(table, detailLines);
  const row = Math.min(rows - 1, Math.floor((thicknessNm - fromNm) / perRow));
  return { x: BAND_X + (thicknessNm - fromNm - row * perRow) * pxPerNm, y: headerHeight + row * ROW_HEIGHT + 30 + BAND_HEIGHT / 2 };
}

/**
 * The chart of `chartTable` as an SVG picture (bands of colour along the thickness, order
 * boundaries marked, a title and detail lines); rasterise it with `rasteriseSvg` for a PNG.
 */
export function chartSvg(table: ChartTable, labels: ChartLabels): string {
  const d = table.thicknessesNm;
  const n = d.length;
  const { fromNm, toNm, stepNm, perRow, rows, pxPerNm, headerHeight } = chartLayout(table, labels.details.length);
  const major = perRow / 5;
  const minor = major / 5;
  const footerLines = [
    `Orders begin at successive minima of the luminance Y of the reflected light. Swatch colours are sRGB (IEC 61966-2-1), from a transfer-matrix film model.`,
    `Printers and screens shift colours: compare under the stated light and viewing angle. A visual chart is an estimate, not calibrated metrology;`,
    `do not base release decisions on it alone, and follow local safety codes for lamps and chemicals.`,
  ];
  const height = headerHeight + rows * ROW_HEIGHT + 24 + footerLines.length * 18 + MARGIN / 2;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${WIDTH}" height="${height}" viewBox="0 0 ${WIDTH} ${height}" font-family="${FONT}">`);
  parts.push(`<rect width="100%" height="100%" fill="${PAPER}"/>`);
  parts.push(`<text x="${MARGIN}" y="${MARGIN}" font-size="24" font-weight="bold" fill="${INK}">${escapeXml(labels.title)}</text>`);
  labels.details.forEach((line, k) => {
    parts.push(`<text x="${MARGIN}" y="${MARGIN + 28 + 20 * k}" font-size="14" fill="${MUTED}">${escapeXml(line)}</text>`);
  });

  for (let row = 0; row < rows; row++) {
    const rowStart = fromNm + row * perRow;
    const rowEnd = Math.min(toNm, rowStart + perRow);
    const top = headerHeight + row * ROW_HEIGHT + 30;
    parts.push(`<text x="${BAND_X - 14}" y="${top + BAND_HEIGHT / 2 + 5}" font-size="13" text-anchor="end" fill="${MUTED}">${formatNm(rowStart)}–${formatNm(rowEnd)} nm</text>`);
    parts.push(`<g shape-rendering="crispEdges">`);
    // Each swatch covers its thickness ± half a step, clipped to the row.
    for (let i = 0; i < n; i++) {
      const left = Math.max(rowStart, d[i] - stepNm / 2);
      const right = Math.min(rowEnd, d[i] + stepNm / 2);
      if (right <= left) continue;
      const x = BAND_X + (left - rowStart) * pxPerNm;
      const w = (right - left) * pxPerNm;
      parts.push(`<rect x="${x.toFixed(2)}" y="${top}" width="${(w + 0.6).toFixed(2)}" height="${BAND_HEIGHT}" fill="${hex(table, i)}"/>`);
    }
    parts.push(`</g>`);
    const bandRight = BAND_X + (rowEnd - rowStart) * pxPerNm;
    parts.push(`<rect x="${BAND_X}" y="${top}" width="${(bandRight - BAND_X).toFixed(2)}" height="${BAND_HEIGHT}" fill="none" stroke="#8a8f96" stroke-width="1"/>`);
    // Ticks and labels.
    const axisY = top + BAND_HEIGHT;
    const firstMinor = Math.ceil(rowStart / minor - 1e-9) * minor;
    for (let t = firstMinor; t <= rowEnd + 1e-9; t += minor) {
      const x = BAND_X + (t - rowStart) * pxPerNm;
      const isMajor = Math.abs(t / major - Math.round(t / major)) < 1e-6;
      parts.push(`<line x1="${x.toFixed(2)}" y1="${axisY}" x2="${x.toFixed(2)}" y2="${axisY + (isMajor ? 10 : 5)}" stroke="${INK}" stroke-width="${isMajor ? 1.2 : 0.8}"/>`);
      if (isMajor) parts.push(`<text x="${x.toFixed(2)}" y="${axisY + 25}" font-size="13" text-anchor="middle" fill="${INK}">${formatNm(t)}</text>`);
    }
    // Order boundaries.
    for (let k = 0; k < table.boundariesNm.length; k++) {
      const b = table.boundariesNm[k];
      if (b < rowStart || b >= rowEnd) continue;
      const x = BAND_X + (b - rowStart) * pxPerNm;
      parts.push(`<line x1="${x.toFixed(2)}" y1="${top - 8}" x2="${x.toFixed(2)}" y2="${top + BAND_HEIGHT}" stroke="#ffffff" stroke-width="4" opacity="0.7"/>`);
      parts.push(`<line x1="${x.toFixed(2)}" y1="${top - 8}" x2="${x.toFixed(2)}" y2="${top + BAND_HEIGHT}" stroke="${INK}" stroke-width="1.6"/>`);
      const label = `order ${k + 2} · ${formatNm(b)} nm`;
      const fitsRight = x + 5 + label.length * 8 < BAND_X + BAND_WIDTH;
      parts.push(`<text x="${(fitsRight ? x + 5 : x - 5).toFixed(2)}" y="${top - 8}" font-size="13" font-weight="bold" text-anchor="${fitsRight ? 'start' : 'end'}" fill="${INK}">${label}</text>`);
    }
    if (row === 0) parts.push(`<text x="${BAND_X + 2}" y="${top - 8}" font-size="13" font-weight="bold" fill="${INK}">order ${table.order[0]}</text>`);
  }
  const footerTop = headerHeight + rows * ROW_HEIGHT + 24;
  footerLines.forEach((line, k) => {
    parts.push(`<text x="${MARGIN}" y="${footerTop + 18 * k}" font-size="12" fill="${MUTED}">${escapeXml(line)}</text>`);
  });
  parts.push('</svg>');
  return parts.join('\n');
}
