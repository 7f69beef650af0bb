/**
 * Thin regions in the report: the table (id, area, centroid, minimum thickness, box) and their
 * bounding boxes as outlines over the map, in original-image pixels. Long lists are cut with a
 * note (the full list is in the run's CSV/JSON output).
 */
import { escapeHtml } from './escapeHtml.js';
import { formatFixed, formatNm, formatSignificant } from './formatNumber.js';
import type { ThinRegionRow } from './types.js';

export const maxRegionRows = 300;
export const maxRegionOutlines = 1000;

/** Bounding box as x, y, width, height whatever `bboxFormat` the row uses. */
export function regionBoxXywh(region: ThinRegionRow): [number, number, number, number] {
  const [a, b, c, d] = region.bbox;
  if (region.bboxFormat === 'corners') return [a, b, c - a + 1, d - b + 1];
  return [a, b, c, d];
}

export function renderThinRegionOutlines(regions: ThinRegionRow[]): string {
  const parts: string[] = [];
  for (const region of regions.slice(0, maxRegionOutlines)) {
    const [x, y, w, h] = regionBoxXywh(region);
    const attrs = `x="${x}" y="${y}" width="${Math.max(w, 1)}" height="${Math.max(h, 1)}"`;
    parts.push(`<rect class="region-shadow" ${attrs}/><rect class="region" data-region="${escapeHtml(String(region.id))}" ${attrs}/>`);
  }
  return parts.join('');
}

export function renderThinRegionTable(regions: ThinRegionRow[]): string {
  if (regions.length === 0) return '<p class="muted">No thin regions.</p>';
  const hasUm2 = regions.some((r) => r.areaUm2 !== undefined && r.areaUm2 !== null);
  const head = '<tr><th class="num">Id</th><th class="num">Area (px)</th>'
    + (hasUm2 ? '<th class="num">Area (µm²)</th>' : '')
    + '<th class="num">Centroid x, y (px)</th><th class="num">Minimum</th><th class="num">Box x, y, w × h (px)</th></tr>';
  const rows = regions.slice(0, maxRegionRows).map((r) => {
    const [x, y, w, h] = regionBoxXywh(r);
    return `<tr data-region="${escapeHtml(String(r.id))}"><td class="num">${escapeHtml(String(r.id))}</td><td class="num">${r.areaPx}</td>`
      + (hasUm2 ? `<td class="num">${escapeHtml(formatSignificant(r.areaUm2 ?? null, 4))}</td>` : '')
      + `<td class="num">${formatFixed(r.centroidX, 1)}, ${formatFixed(r.centroidY, 1)}</td>`
      + `<td class="num">${r.minThicknessNm === null ? 'too dark to measure' : formatNm(r.minThicknessNm)}</td>`
      + `<td class="num">${x}, ${y}, ${w} × ${h}</td></tr>`;
  });
  const cut = regions.length > maxRegionRows
    ? `<p class="note">Showing the first ${maxRegionRows} of ${regions.length} regions; the run's output files list them all.</p>` : '';
  return `<div class="scroll"><table class="regions"><thead>${head}</thead><tbody>${rows.join('')}</tbody></table></div>${cut}`;
}
