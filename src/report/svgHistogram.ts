/**
 * Histogram as inline SVG: one bar per bin between its edges, optionally coloured by a function
 * of the bin centre (the map's colour bar), with vertical reference lines (the thin threshold).
 */
import { escapeHtml } from './escapeHtml.js';
import { niceDomain } from './niceTicks.js';
import { makeFrame, openPlotGroup, openSvg, px, renderAxes, xToPx, yToPx } from './svgFrame.js';
import type { ReferenceLine } from './svgChart.js';

export interface HistogramSpec {
  title: string;
  xLabel: string;
  yLabel: string;
  edges: ReadonlyArray<number>;
  counts: ReadonlyArray<number>;
  /** Fill of the bar whose centre is `centre` (default a neutral tone). */
  colourOf?: (centre: number) => string;
  verticalLines?: ReferenceLine[];
  widthPx?: number;
  heightPx?: number;
  id?: string;
}

export function checkHistogram(edges: ReadonlyArray<number>, counts: ReadonlyArray<number>, name = 'histogram'): void {
  if (!Array.isArray(edges) || !Array.isArray(counts)) {
    throw new TypeError(`${name}: edgesNm and counts must be arrays, received ${typeof edges} and ${typeof counts}`);
  }
  if (counts.length > 0 && edges.length !== counts.length + 1) {
    throw new RangeError(`${name}: edgesNm must have counts.length + 1 = ${counts.length + 1} entries, received ${edges.length}`);
  }
  for (let i = 1; i < edges.length; i++) {
    if (!(edges[i] > edges[i - 1])) {
      throw new RangeError(`${name}: edgesNm must be finite and increasing, received ${edges[i - 1]} then ${edges[i]} at index ${i}`);
    }
  }
  counts.forEach((c, i) => {
    if (!Number.isFinite(c) || c < 0) throw new RangeError(`${name}: counts[${i}] must be a finite number >= 0, received ${c}`);
  });
}

export function renderHistogram(spec: HistogramSpec): string {
  checkHistogram(spec.edges, spec.counts);
  const widthPx = spec.widthPx ?? 640;
  const heightPx = spec.heightPx ?? 280;
  const n = spec.counts.length;
  const xs = [...(n > 0 ? [spec.edges[0], spec.edges[n]] : [0, 1]), ...(spec.verticalLines ?? []).map((l) => l.value)];
  const xDomain: [number, number] = n > 0 ? [Math.min(...xs), Math.max(...xs)] : [0, 1];
  const maxCount = n > 0 ? Math.max(...spec.counts) : 0;
  const yDomain = niceDomain(0, maxCount > 0 ? maxCount : 1, 5);
  const frame = makeFrame(widthPx, heightPx, xDomain, [0, yDomain[1]], { left: 64, right: 18, top: 20, bottom: 48 });
  const parts = [openSvg(frame, spec.title, 'chart histogram', spec.id), renderAxes(frame, spec.xLabel, spec.yLabel), openPlotGroup(frame)];
  const base = yToPx(frame, 0);
  for (let i = 0; i < n; i++) {
    const x0 = xToPx(frame, spec.edges[i]);
    const x1 = xToPx(frame, spec.edges[i + 1]);
    const y = yToPx(frame, spec.counts[i]);
    const fill = spec.colourOf ? spec.colourOf((spec.edges[i] + spec.edges[i + 1]) / 2) : '#7c8a99';
    parts.push(`<rect class="bar" x="${px(x0)}" y="${px(y)}" width="${px(Math.max(0.5, x1 - x0 - 0.6))}" height="${px(base - y)}" fill="${escapeHtml(fill)}">`
      + `<title>${spec.edges[i]}–${spec.edges[i + 1]}: ${spec.counts[i]}</title></rect>`);
  }
  for (const line of spec.verticalLines ?? []) {
    const x = px(xToPx(frame, line.value));
    parts.push(`<line class="ref-line" x1="${x}" x2="${x}" y1="${frame.top}" y2="${frame.top + frame.plotHeight}" stroke="${escapeHtml(line.colour)}" stroke-dasharray="6 4"/>`,
      `<text class="ref-label" x="${x}" y="${frame.top - 3}" dx="4" fill="${escapeHtml(line.colour)}">${escapeHtml(line.label)}</text>`);
  }
  parts.push('</g></svg>');
  return parts.join('');
}
