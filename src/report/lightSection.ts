/**
 * The light on the film in a map report: the exposure field (the light each part of the photo
 * received relative to the median, fitted for uneven light or applied from a calibration) as a
 * small grey picture of the photo's frame with its range, and how evenly the film was lit after
 * the map. Pure: the caller samples the field on a coarse grid (src/map/mapReportInput.ts).
 */
import { checkRecord } from './checkInput.js';
import { escapeHtml } from './escapeHtml.js';
import { formatFixed } from './formatNumber.js';
import type { ReportLight } from './types.js';

export function checkReportLight(value: unknown, name: string): void {
  if (value === null || value === undefined) return;
  checkRecord(value, name);
  const light = value as Record<string, unknown>;
  const field = light.field;
  if (field === null || field === undefined) return;
  checkRecord(field, `${name}.field`);
  const f = field as Record<string, unknown>;
  for (const key of ['gridWidth', 'gridHeight'] as const) {
    if (!Number.isInteger(f[key]) || (f[key] as number) < 1) throw new RangeError(`${name}.field.${key} must be a whole number >= 1, received ${String(f[key])}`);
  }
  const gains = f.relativeGain;
  if (!Array.isArray(gains) || gains.length !== (f.gridWidth as number) * (f.gridHeight as number) || !gains.every((g) => typeof g === 'number' && Number.isFinite(g) && g > 0)) {
    throw new RangeError(`${name}.field.relativeGain must hold gridWidth × gridHeight finite gains > 0`);
  }
}

/** Grey level of a relative gain on the picture's scale (dim = dark), as a CSS hex colour. */
function grey(gain: number, low: number, high: number): string {
  const t = high > low ? (gain - low) / (high - low) : 0.5;
  const level = Math.round(40 + 200 * Math.min(1, Math.max(0, t)));
  const hex = level.toString(16).padStart(2, '0');
  return `#${hex}${hex}${hex}`;
}

/** The field's picture: one rectangle per grid cell in the photo's aspect, with a legend. */
function fieldPicture(field: NonNullable<ReportLight['field']>): string {
  const { gridWidth: w, gridHeight: h, relativeGain } = field;
  const low = Math.min(...relativeGain);
  const high = Math.max(...relativeGain);
  const cell = Math.max(4, Math.floor(240 / Math.max(w, h)));
  const width = w * cell;
  const height = h * cell;
  const rects: string[] = [];
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) rects.push(`<rect x="${x * cell}" y="${y * cell}" width="${cell}" height="${cell}" fill="${grey(relativeGain[y * w + x], low, high)}"/>`);
  }
  const legendY = height + 8;
  const legend = `<defs><linearGradient id="light-ramp"><stop offset="0" stop-color="${grey(low, low, high)}"/><stop offset="1" stop-color="${grey(high, low, high)}"/></linearGradient></defs>`
    + `<rect x="0" y="${legendY}" width="${width}" height="10" fill="url(#light-ramp)"/>`
    + `<text x="0" y="${legendY + 24}" font-size="11">×${formatFixed(low, 2)}</text>`
    + `<text x="${width}" y="${legendY + 24}" font-size="11" text-anchor="end">×${formatFixed(high, 2)}</text>`;
  return `<svg class="light-field" viewBox="0 0 ${width} ${legendY + 30}" width="${width}" height="${legendY + 30}" role="img" aria-label="Relative light over the photo, from ×${formatFixed(low, 2)} to ×${formatFixed(high, 2)}">`
    + `${legend}<g shape-rendering="crispEdges">${rects.join('')}</g><rect x="0.5" y="0.5" width="${width - 1}" height="${height - 1}" fill="none" stroke="#888"/></svg>`;
}

/** The card (id `light`). */
export function renderLightCard(light: ReportLight | null | undefined): string {
  if (!light) return '';
  const rows: Array<[string, string]> = [];
  const field = light.field ?? null;
  if (field) {
    rows.push(['Light field', field.source === 'calibration' ? 'from the calibration file, applied as it is' : `fitted to this photo (${field.rounds} round${field.rounds === 1 ? '' : 's'})`]);
    rows.push(['Relative light over the film', `×${formatFixed(field.gainMin, 2)} to ×${formatFixed(field.gainMax, 2)}`]);
  } else {
    rows.push(['Light field', 'none: one exposure for the whole photo']);
  }
  if (light.evenness) {
    rows.push(['Light left uneven after the map', `×${formatFixed(light.evenness.gainMin, 3)} to ×${formatFixed(light.evenness.gainMax, 3)}`]);
  }
  const table = `<table class="values light"><tbody>${rows.map(([k, v]) => `<tr><th scope="row">${escapeHtml(k)}</th><td>${escapeHtml(v)}</td></tr>`).join('')}</tbody></table>`;
  const picture = field
    ? `<figure class="light-picture">${fieldPicture(field)}<figcaption>Light each part of the photo received, relative to ${field.source === 'calibration' ? 'the photo’s centre' : 'the median over the film'} (darker = less light); the photo was divided by it before mapping.</figcaption></figure>`
    : '';
  return `<section class="card" id="light"><h2>Light on the film</h2>${table}${picture}</section>`;
}
