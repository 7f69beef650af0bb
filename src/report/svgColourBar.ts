/**
 * The map's colour bar as inline SVG: a gradient through the caller's stops from minNm to maxNm,
 * nice ticks labelled in nm, and the thin threshold marked when it falls in range.
 */
import { escapeHtml } from './escapeHtml.js';
import { checkColourStops, type ColourStop } from './colourRamp.js';
import { niceTicks } from './niceTicks.js';
import { formatTick, px } from './svgFrame.js';

export interface ColourBarSpec {
  minNm: number;
  maxNm: number;
  stops: ColourStop[];
}

export function renderColourBar(bar: ColourBarSpec, thinBelowNm: number | null, widthPx = 720): string {
  if (!Number.isFinite(bar.minNm) || !Number.isFinite(bar.maxNm) || bar.maxNm < bar.minNm) {
    throw new RangeError(`colourBar: minNm and maxNm must be finite with minNm <= maxNm, received ${bar.minNm} and ${bar.maxNm}`);
  }
  if (bar.maxNm === bar.minNm) bar = { ...bar, minNm: bar.minNm - 1, maxNm: bar.maxNm + 1 }; // a flat map still gets a bar
  const stops = checkColourStops(bar.stops);
  const left = 24;
  const right = widthPx - 24;
  const span = bar.maxNm - bar.minNm;
  const toPx = (nm: number) => left + ((nm - bar.minNm) / span) * (right - left);
  const gradient = stops
    .map((s) => `<stop offset="${Math.min(1, Math.max(0, (s.nm - bar.minNm) / span)).toFixed(5)}" stop-color="${escapeHtml(s.hex)}"/>`)
    .join('');
  const ticks = niceTicks(bar.minNm, bar.maxNm, 10);
  const parts = [
    `<svg class="colour-bar" viewBox="0 0 ${widthPx} 78" role="img" aria-label="Colour bar, thickness in nm">`,
    '<title>Colour bar, thickness in nm</title>',
    `<defs><linearGradient id="colour-bar-gradient" x1="0" x2="1" y1="0" y2="0">${gradient}</linearGradient></defs>`,
    `<rect class="bar-fill" x="${left}" y="16" width="${right - left}" height="18" fill="url(#colour-bar-gradient)"/>`,
  ];
  for (const v of ticks.values) {
    const x = px(toPx(v));
    parts.push(`<line class="tick" x1="${x}" x2="${x}" y1="34" y2="39"/>`,
      `<text class="tick-label" x="${x}" y="52" text-anchor="middle">${formatTick(v, ticks.decimals)}</text>`);
  }
  if (thinBelowNm !== null && thinBelowNm >= bar.minNm && thinBelowNm <= bar.maxNm) {
    const x = px(toPx(thinBelowNm));
    parts.push(`<path class="thin-mark" d="M${x} 12 v26"/><text class="thin-mark-label" x="${x}" y="10" text-anchor="middle">thin</text>`);
  }
  parts.push(`<text class="axis-label" x="${widthPx / 2}" y="73" text-anchor="middle">Thickness (nm)</text></svg>`);
  return parts.join('');
}
