/**
 * The film area and the fit quality in a map report, in words: how much of the photo is film
 * (pixels, share of the photo, mm² with a pixel size), the pixels left out by reason, and how
 * well the model explains the film's colours with its verdict spelled out.
 */
import { checkRecord } from './checkInput.js';
import { escapeHtml } from './escapeHtml.js';
import { formatFixed, formatPercent, formatSignificant, noValue } from './formatNumber.js';
import type { ReportFilmArea, ReportFitQuality } from './types.js';

/** What each reason of JSON `film_area.excluded_px` means, in order of display. */
export const exclusionLabels: ReadonlyArray<readonly [string, string]> = [
  ['outside_region', 'Outside the region or mask, or transparent in the photo'],
  ['dark_surroundings', 'Dark surroundings (too dark, outside the film’s outline)'],
  ['not_film_colour', 'Colours no thickness of this film gives (frames, holders, labels, background)'],
  ['glint', 'Glints (clipped highlights outside the film)'],
  ['isolated', 'Isolated specks apart from the film'],
  ['undecided', 'Undecided: black film or background, cannot tell (give --region or --mask)'],
];

/** The fit verdicts in plain words. */
export const verdictWords: Record<ReportFitQuality['verdict'], string> = {
  good: 'Good: the model explains the film’s colours well.',
  fair: 'Fair: the model explains the film’s colours only roughly; read small differences with care.',
  poor: 'Poor: the model does not explain the film’s colours; the thicknesses are not reliable (see the warnings for likely causes).',
};

export const NO_FILM_TEXT = 'No film found in this photo';

export function checkFilmArea(value: unknown, name: string): void {
  if (value === null || value === undefined) return;
  checkRecord(value, name);
  const area = value as Record<string, unknown>;
  if (area.mode !== 'auto' && area.mode !== 'whole') throw new RangeError(`${name}.mode must be 'auto' or 'whole', received ${JSON.stringify(area.mode)}`);
  if (typeof area.found !== 'boolean') throw new TypeError(`${name}.found must be a boolean, received ${typeof area.found}`);
  for (const key of ['areaPx', 'fraction'] as const) {
    if (typeof area[key] !== 'number' || !Number.isFinite(area[key]) || (area[key] as number) < 0) {
      throw new RangeError(`${name}.${key} must be a finite number >= 0, received ${String(area[key])}`);
    }
  }
  checkRecord(area.excludedPx, `${name}.excludedPx`);
}

export function checkFitQuality(value: unknown, name: string): void {
  if (value === null || value === undefined) return;
  checkRecord(value, name);
  const verdict = (value as Record<string, unknown>).verdict;
  if (verdict !== 'good' && verdict !== 'fair' && verdict !== 'poor') {
    throw new RangeError(`${name}.verdict must be 'good', 'fair' or 'poor', received ${JSON.stringify(verdict)}`);
  }
}

/** Area on the sample: mm² from µm², with about 4 significant digits. */
function formatMm2(areaUm2: number | null): string {
  return areaUm2 === null || !Number.isFinite(areaUm2) ? noValue : `${formatSignificant(areaUm2 / 1e6, 4)} mm²`;
}

/** The card (id `film-area`): the film area, the pixels left out by reason, and the fit quality. */
export function renderFilmAreaCard(area: ReportFilmArea | null | undefined, fit: ReportFitQuality | null | undefined, totalPx: number): string {
  const parts: string[] = [];
  if (area) {
    if (!area.found) parts.push(`<p class="no-film">${escapeHtml(NO_FILM_TEXT)}.</p>`);
    const how = area.mode === 'auto' ? 'found in the photo (--film-area auto)' : 'every pixel inside the region or mask (--film-area whole)';
    const rows = [
      ['Film area', `${area.areaPx} px (${formatPercent(area.fraction)} of the photo)`],
      ...(area.areaUm2 !== null ? [['Film area on the sample', formatMm2(area.areaUm2)]] : []),
      ['How the film area was chosen', how],
    ].map(([k, v]) => `<tr><th scope="row">${escapeHtml(k)}</th><td>${escapeHtml(v)}</td></tr>`);
    parts.push(`<table class="values film-area"><tbody>${rows.join('')}</tbody></table>`);
    const excluded = exclusionLabels
      .map(([key, label]) => [label, area.excludedPx[key] ?? 0] as const)
      .filter(([, px]) => px > 0)
      .map(([label, px]) => `<tr><th scope="row">${escapeHtml(label)}</th><td class="num">${px}</td><td class="num">${escapeHtml(formatPercent(totalPx > 0 ? px / totalPx : null))}</td></tr>`);
    parts.push(excluded.length === 0
      ? '<p class="muted">No pixels were left out of the film area.</p>'
      : '<h3>Pixels left out</h3><table class="excluded"><thead><tr><th>Reason</th><th class="num">Pixels</th><th class="num">Share of the photo</th></tr></thead>'
        + `<tbody>${excluded.join('')}</tbody></table>`);
  } else {
    parts.push('<p class="muted">This map records no film area (every pixel inside the region or mask was taken as film).</p>');
  }
  parts.push('<h3>How well the model fits</h3>');
  if (fit) {
    const rows = [
      ['Verdict', verdictWords[fit.verdict]],
      ['Median colour difference ΔE2000, photo vs model', formatFixed(fit.median_delta_e2000, 2)],
      ['95th percentile of ΔE2000', formatFixed(fit.p95_delta_e2000, 2)],
      ['Film pixels whose colour matches no thickness', formatPercent(fit.unmatched_fraction)],
    ].map(([k, v]) => `<tr><th scope="row">${escapeHtml(k)}</th><td>${escapeHtml(v)}</td></tr>`);
    parts.push(`<table class="values fit-quality verdict-${fit.verdict}"><tbody>${rows.join('')}</tbody></table>`);
  } else {
    parts.push('<p class="muted">Not measured for this map.</p>');
  }
  return `<section class="card" id="film-area"><h2>Film area and fit</h2>${parts.join('')}</section>`;
}
