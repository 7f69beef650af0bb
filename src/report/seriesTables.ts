/**
 * Tables of a series report: the drainage fits (model, formula, parameters ± uncertainty, R²,
 * predicted crossing) and the per-frame figures.
 */
import { escapeHtml } from './escapeHtml.js';
import { formatFixed, formatNm, formatPercent, formatSignificant } from './formatNumber.js';
import { describeCrossing, fitColours } from './seriesCharts.js';
import type { DrainageFitSummary, SeriesFrameRow } from './types.js';

export function renderFitsTable(fits: DrainageFitSummary[]): string {
  if (fits.length === 0) return '<p class="muted">No drainage model was fitted.</p>';
  const rows = fits.map((fit, i) => {
    const parameters = Object.entries(fit.parameters)
      .map(([name, p]) => `${escapeHtml(name)} = ${escapeHtml(formatSignificant(p.value, 5))}`
        + (p.uncertainty === null ? '' : ` ± ${escapeHtml(formatSignificant(p.uncertainty, 2))}`))
      .join('<br>');
    const swatch = `<span style="color:${fitColours[i % fitColours.length]}">■</span> `;
    return `<tr><td>${swatch}${escapeHtml(fit.model)}</td><td><code>${escapeHtml(fit.formula)}</code></td><td>${parameters || '—'}</td>`
      + `<td class="num">${escapeHtml(formatFixed(fit.rSquared, 4))}</td>`
      + `<td>${fit.crossing ? `${escapeHtml(fit.crossing.quantity)}: ` : ''}${escapeHtml(describeCrossing(fit.crossing))}</td></tr>`;
  });
  return '<div class="scroll"><table class="fits"><thead><tr><th>Model</th><th>Formula</th><th>Parameters (± 1σ)</th>'
    + `<th class="num">R²</th><th>Threshold crossing</th></tr></thead><tbody>${rows.join('')}</tbody></table></div>`;
}

/** Film area of a frame: `12,345 px`, `no film`, or `—` when unknown. */
export function formatFilmArea(frame: SeriesFrameRow): string {
  if (frame.filmFound === false) return 'no film';
  return frame.filmAreaPx === null || frame.filmAreaPx === undefined ? '—' : `${Math.round(frame.filmAreaPx).toLocaleString('en-US')} px`;
}

export function renderFramesTable(frames: SeriesFrameRow[]): string {
  const rows = frames.map((f) => `<tr${f.filmFound === false ? ' class="no-film"' : ''}><td>${escapeHtml(f.frame)}</td><td class="num">${formatFixed(f.timeS, 1)}</td>`
    + `<td class="num">${formatNm(f.meanNm)}</td><td class="num">${formatNm(f.medianNm)}</td><td class="num">${formatNm(f.minNm)}</td>`
    + `<td class="num">${formatPercent(f.thinFraction)}</td><td class="num">${f.thinRegions}</td><td class="num">${formatPercent(f.coverage)}</td>`
    + `<td class="num">${escapeHtml(formatFilmArea(f))}</td></tr>`);
  return '<div class="scroll"><table class="frames"><thead><tr><th>Frame</th><th class="num">Time (s)</th><th class="num">Mean</th>'
    + '<th class="num">Median</th><th class="num">Minimum</th><th class="num">Thin fraction</th><th class="num">Thin regions</th>'
    + `<th class="num">Coverage</th><th class="num">Film area</th></tr></thead><tbody>${rows.join('')}</tbody></table></div>`;
}
