/**
 * Line chart as inline SVG: several series (points or lines, gaps where y is null/NaN),
 * horizontal reference lines (a thin threshold), vertical lines and shaded bands (a predicted
 * crossing and its interval), and a legend. Axes with nice ticks and unit labels from `svgFrame`.
 * Every text from input is escaped.
 */
import { escapeHtml } from './escapeHtml.js';
import { niceDomain } from './niceTicks.js';
import { makeFrame, openPlotGroup, openSvg, px, renderAxes, xToPx, yToPx, type PlotFrame } from './svgFrame.js';

export interface LineSeries {
  label: string;
  points: ReadonlyArray<readonly [number, number | null]>;
  colour: string;
  /** 'line' (default), 'points' (markers only) or 'both'. */
  style?: 'line' | 'points' | 'both';
  dashed?: boolean;
}

export interface ReferenceLine {
  value: number;
  label: string;
  colour: string;
  dashed?: boolean;
  /** Short text written beside the line inside the plot (vertical lines), e.g. "188 s, extrapolated". */
  tag?: string;
}

export interface ReferenceBand {
  from: number;
  to: number;
  label: string;
  colour: string;
}

export interface LineChartSpec {
  /** Accessible name of the chart. */
  title: string;
  /** Axis titles with units, e.g. "Time (s)", "Thickness (nm)". */
  xLabel: string;
  yLabel: string;
  series: LineSeries[];
  widthPx?: number;
  heightPx?: number;
  xDomain?: [number, number];
  yDomain?: [number, number];
  horizontalLines?: ReferenceLine[];
  verticalLines?: ReferenceLine[];
  verticalBands?: ReferenceBand[];
  id?: string;
}

const legendRowPx = 18;

export function renderLineChart(spec: LineChartSpec): string {
  const widthPx = spec.widthPx ?? 640;
  const heightPx = spec.heightPx ?? 300;
  const legendItems = [...spec.series.map((s) => ({ label: s.label, colour: s.colour, dashed: s.dashed ?? false })),
    ...(spec.horizontalLines ?? []).map((l) => ({ label: l.label, colour: l.colour, dashed: l.dashed ?? true })),
    ...(spec.verticalLines ?? []).map((l) => ({ label: l.label, colour: l.colour, dashed: l.dashed ?? true }))];
  const legendRows = layoutLegend(legendItems.map((i) => i.label), widthPx - 80);
  const top = 14 + legendRows.length * legendRowPx;
  const frame = makeFrame(widthPx, heightPx, spec.xDomain ?? autoDomain(spec, 'x'), spec.yDomain ?? autoDomain(spec, 'y'),
    { left: 64, right: 18, top, bottom: 48 });
  const clipId = `clip-${spec.id ?? Math.abs(hashText(spec.title + spec.xLabel + spec.yLabel)).toString(36)}`;
  const parts = [openSvg(frame, spec.title, 'chart line-chart', spec.id), renderAxes(frame, spec.xLabel, spec.yLabel)];
  parts.push(`<clipPath id="${escapeHtml(clipId)}"><rect x="${frame.left}" y="${frame.top}" width="${frame.plotWidth}" height="${frame.plotHeight}"/></clipPath>`);
  parts.push(openPlotGroup(frame), `<g clip-path="url(#${escapeHtml(clipId)})">`);
  for (const band of spec.verticalBands ?? []) {
    const x0 = xToPx(frame, Math.min(band.from, band.to));
    const x1 = xToPx(frame, Math.max(band.from, band.to));
    parts.push(`<rect class="band" x="${px(x0)}" y="${frame.top}" width="${px(Math.max(1, x1 - x0))}" height="${frame.plotHeight}" fill="${escapeHtml(band.colour)}"><title>${escapeHtml(band.label)}</title></rect>`);
  }
  for (const line of spec.horizontalLines ?? []) {
    const y = px(yToPx(frame, line.value));
    parts.push(`<line class="ref-line" x1="${frame.left}" x2="${frame.left + frame.plotWidth}" y1="${y}" y2="${y}" stroke="${escapeHtml(line.colour)}"${line.dashed ?? true ? ' stroke-dasharray="6 4"' : ''}><title>${escapeHtml(line.label)}</title></line>`);
  }
  let tagRow = 0;
  for (const line of spec.verticalLines ?? []) {
    const x = px(xToPx(frame, line.value));
    parts.push(`<line class="ref-line" x1="${x}" x2="${x}" y1="${frame.top}" y2="${frame.top + frame.plotHeight}" stroke="${escapeHtml(line.colour)}"${line.dashed ?? true ? ' stroke-dasharray="6 4"' : ''}><title>${escapeHtml(line.label)}</title></line>`);
    if (line.tag) {
      const nearRight = xToPx(frame, line.value) > frame.left + frame.plotWidth * 0.75;
      parts.push(`<text class="ref-label" x="${x}" y="${frame.top + 14 + 15 * tagRow++}" dx="${nearRight ? -5 : 5}" text-anchor="${nearRight ? 'end' : 'start'}" fill="${escapeHtml(line.colour)}">${escapeHtml(line.tag)}</text>`);
    }
  }
  for (const s of spec.series) parts.push(renderSeries(frame, s));
  parts.push('</g><g class="overlay"></g></g>');
  parts.push(renderLegend(legendRows, legendItems));
  parts.push('</svg>');
  return parts.join('');
}

function renderSeries(frame: PlotFrame, series: LineSeries): string {
  const style = series.style ?? 'line';
  const colour = escapeHtml(series.colour);
  let path = '';
  let pen = false;
  let markers = '';
  for (const [x, y] of series.points) {
    if (y === null || !Number.isFinite(y) || !Number.isFinite(x)) { pen = false; continue; }
    const xp = px(xToPx(frame, x));
    const yp = px(yToPx(frame, y));
    path += `${pen ? 'L' : 'M'}${xp} ${yp}`;
    pen = true;
    if (style !== 'line') markers += `<circle cx="${xp}" cy="${yp}" r="3"/>`;
  }
  const dash = series.dashed ? ' stroke-dasharray="5 3"' : '';
  const line = style !== 'points' && path ? `<path class="series-line" d="${path}" stroke="${colour}"${dash}/>` : '';
  const dots = markers ? `<g class="series-points" fill="${colour}">${markers}</g>` : '';
  return `<g class="series" data-label="${escapeHtml(series.label)}"><title>${escapeHtml(series.label)}</title>${line}${dots}</g>`;
}

function autoDomain(spec: LineChartSpec, axis: 'x' | 'y'): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  const take = (v: number | null) => {
    if (v !== null && Number.isFinite(v)) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
  };
  for (const s of spec.series) for (const p of s.points) if (p[1] !== null && Number.isFinite(p[1])) take(p[axis === 'x' ? 0 : 1]);
  for (const l of (axis === 'x' ? spec.verticalLines : spec.horizontalLines) ?? []) take(l.value);
  if (axis === 'x') for (const b of spec.verticalBands ?? []) { take(b.from); take(b.to); }
  if (lo === Infinity) return [0, 1];
  return niceDomain(lo, hi, axis === 'x' ? 8 : 5);
}

/** Splits legend labels into rows that fit `widthPx` (about 7.2 px per character). */
function layoutLegend(labels: string[], widthPx: number): Array<Array<{ index: number; x: number }>> {
  const rows: Array<Array<{ index: number; x: number }>> = [];
  let row: Array<{ index: number; x: number }> = [];
  let x = 0;
  labels.forEach((label, index) => {
    const w = 30 + label.length * 7.2 + 18;
    if (row.length > 0 && x + w > widthPx) { rows.push(row); row = []; x = 0; }
    row.push({ index, x });
    x += w;
  });
  if (row.length > 0) rows.push(row);
  return rows;
}

function renderLegend(rows: Array<Array<{ index: number; x: number }>>, items: Array<{ label: string; colour: string; dashed: boolean }>): string {
  const parts = ['<g class="legend">'];
  rows.forEach((row, r) => {
    const y = 12 + r * legendRowPx;
    for (const { index, x } of row) {
      const item = items[index];
      const x0 = 64 + x;
      parts.push(`<line x1="${px(x0)}" x2="${px(x0 + 24)}" y1="${y}" y2="${y}" stroke="${escapeHtml(item.colour)}"${item.dashed ? ' stroke-dasharray="5 3"' : ''}/>`,
        `<text x="${px(x0 + 30)}" y="${y}" dy="0.32em">${escapeHtml(item.label)}</text>`);
    }
  });
  parts.push('</g>');
  return parts.join('');
}

function hashText(text: string): number {
  let h = 0;
  for (let i = 0; i < text.length; i++) h = (Math.imul(h, 31) + text.charCodeAt(i)) | 0;
  return h;
}
