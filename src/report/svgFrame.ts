/**
 * The drawing frame shared by the report's SVG charts: outer size, margins, data domains, the
 * linear mapping from data to pixels, and the axes with nice ticks, grid lines and unit labels.
 * The plot group carries its mapping as data attributes so the page script can draw into it.
 */
import { escapeHtml } from './escapeHtml.js';
import { niceTicks } from './niceTicks.js';

export interface PlotFrame {
  readonly widthPx: number;
  readonly heightPx: number;
  readonly left: number;
  readonly top: number;
  readonly plotWidth: number;
  readonly plotHeight: number;
  readonly xDomain: readonly [number, number];
  readonly yDomain: readonly [number, number];
}

export interface Margins {
  left: number;
  right: number;
  top: number;
  bottom: number;
}

export const defaultMargins: Margins = { left: 64, right: 18, top: 14, bottom: 48 };

export function makeFrame(
  widthPx: number,
  heightPx: number,
  xDomain: readonly [number, number],
  yDomain: readonly [number, number],
  margins: Margins = defaultMargins,
): PlotFrame {
  for (const [name, d] of [['xDomain', xDomain], ['yDomain', yDomain]] as const) {
    if (!Number.isFinite(d[0]) || !Number.isFinite(d[1]) || d[0] >= d[1]) {
      throw new RangeError(`makeFrame: ${name} must be two finite numbers, low < high, received [${d[0]}, ${d[1]}]`);
    }
  }
  return {
    widthPx, heightPx, left: margins.left, top: margins.top,
    plotWidth: widthPx - margins.left - margins.right,
    plotHeight: heightPx - margins.top - margins.bottom,
    xDomain, yDomain,
  };
}

export function xToPx(frame: PlotFrame, x: number): number {
  return frame.left + ((x - frame.xDomain[0]) / (frame.xDomain[1] - frame.xDomain[0])) * frame.plotWidth;
}

export function yToPx(frame: PlotFrame, y: number): number {
  return frame.top + (1 - (y - frame.yDomain[0]) / (frame.yDomain[1] - frame.yDomain[0])) * frame.plotHeight;
}

/** Pixel coordinate rounded to 0.1 px for compact SVG text. */
export function px(value: number): string {
  return String(Math.round(value * 10) / 10);
}

/** Tick label text: exactly `decimals` decimals, with no `-0`. */
export function formatTick(value: number, decimals: number): string {
  const text = value.toFixed(decimals);
  return /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
}

/** Grid lines, tick marks, tick labels and axis titles (titles carry the units, e.g. "Time (s)"). */
export function renderAxes(frame: PlotFrame, xLabel: string, yLabel: string, xTickCount = 8, yTickCount = 5): string {
  const x = niceTicks(frame.xDomain[0], frame.xDomain[1], xTickCount);
  const y = niceTicks(frame.yDomain[0], frame.yDomain[1], yTickCount);
  const bottom = frame.top + frame.plotHeight;
  const right = frame.left + frame.plotWidth;
  const parts: string[] = ['<g class="axes">'];
  for (const v of x.values) {
    const p = px(xToPx(frame, v));
    parts.push(`<line class="grid" x1="${p}" x2="${p}" y1="${px(frame.top)}" y2="${px(bottom)}"/>`,
      `<line class="tick" x1="${p}" x2="${p}" y1="${px(bottom)}" y2="${px(bottom + 5)}"/>`,
      `<text class="tick-label" x="${p}" y="${px(bottom + 18)}" text-anchor="middle">${formatTick(v, x.decimals)}</text>`);
  }
  for (const v of y.values) {
    const p = px(yToPx(frame, v));
    parts.push(`<line class="grid" x1="${px(frame.left)}" x2="${px(right)}" y1="${p}" y2="${p}"/>`,
      `<line class="tick" x1="${px(frame.left - 5)}" x2="${px(frame.left)}" y1="${p}" y2="${p}"/>`,
      `<text class="tick-label" x="${px(frame.left - 8)}" y="${p}" dy="0.32em" text-anchor="end">${formatTick(v, y.decimals)}</text>`);
  }
  parts.push(
    `<line class="axis" x1="${px(frame.left)}" x2="${px(right)}" y1="${px(bottom)}" y2="${px(bottom)}"/>`,
    `<line class="axis" x1="${px(frame.left)}" x2="${px(frame.left)}" y1="${px(frame.top)}" y2="${px(bottom)}"/>`,
    `<text class="axis-label x-label" x="${px(frame.left + frame.plotWidth / 2)}" y="${px(frame.heightPx - 8)}" text-anchor="middle">${escapeHtml(xLabel)}</text>`,
    `<text class="axis-label y-label" transform="translate(14 ${px(frame.top + frame.plotHeight / 2)}) rotate(-90)" text-anchor="middle">${escapeHtml(yLabel)}</text>`,
    '</g>',
  );
  return parts.join('');
}

/** Opening tag of the plot group, with the data→pixel mapping for the page script. */
export function openPlotGroup(frame: PlotFrame): string {
  return `<g class="plot" data-x0="${frame.xDomain[0]}" data-x1="${frame.xDomain[1]}" data-y0="${frame.yDomain[0]}"`
    + ` data-y1="${frame.yDomain[1]}" data-left="${frame.left}" data-top="${frame.top}"`
    + ` data-width="${frame.plotWidth}" data-height="${frame.plotHeight}">`;
}

/** Opening `<svg>` tag with a viewBox (the page scales it to its column) and an accessible name. */
export function openSvg(frame: PlotFrame, title: string, className: string, id?: string): string {
  const idAttr = id ? ` id="${escapeHtml(id)}"` : '';
  return `<svg${idAttr} class="${escapeHtml(className)}" viewBox="0 0 ${frame.widthPx} ${frame.heightPx}" role="img" aria-label="${escapeHtml(title)}">`
    + `<title>${escapeHtml(title)}</title>`;
}
