/**
 * `renderSeriesReport(input)`: the self-contained HTML report of a photo series (written as
 * `report.html` by `lamella series`): drainage charts with fits and crossings, a frame slider,
 * fit and frame tables, and the full map view of the chosen frame when given. When the film
 * ruptured, the page opens with "Film ruptured between … s (frame …) and … s (frame …)" and both
 * charts mark the moment; the "last" figures are those of the last frame with film.
 */
import { checkFiniteOrNull, checkRecord, checkString, checkStringArray, describeValue } from './checkInput.js';
import { escapeHtml } from './escapeHtml.js';
import { formatFixed, formatNm } from './formatNumber.js';
import { renderFrameViewer } from './frameViewer.js';
import { renderFlowSection } from './flowSection.js';
import { renderMapSections, renderParameterSections, tile } from './mapSections.js';
import { renderPage } from './pageShell.js';
import { checkMapReportInput } from './renderMapReport.js';
import { describeRuptureLine, formatSecondsShort, renderDrainageChart, renderThinFractionChart, ruptureColour } from './seriesCharts.js';
import { renderFitsTable, renderFramesTable } from './seriesTables.js';
import type { DrainageFitSummary, ReportSeriesObservations, SeriesFrameRow, SeriesReportInput, SeriesRupture } from './types.js';

export function checkSeriesReportInput(input: SeriesReportInput): void {
  checkRecord(input, 'input');
  checkString(input.title, 'input.title');
  checkString(input.generatedAt, 'input.generatedAt');
  if (!Array.isArray(input.frames)) throw new TypeError(`input.frames must be an array, received ${describeValue(input.frames)}`);
  input.frames.forEach((f, i) => {
    const name = `input.frames[${i}]`;
    checkRecord(f, name);
    checkString(f.frame, `${name}.frame`);
    if (typeof f.timeS !== 'number' || !Number.isFinite(f.timeS)) throw new RangeError(`${name}.timeS must be a finite number, received ${describeValue(f.timeS)}`);
    for (const key of ['meanNm', 'medianNm', 'minNm', 'thinFraction'] as const) checkFiniteOrNull(f[key], `${name}.${key}`);
    checkFiniteOrNull(f.coverage, `${name}.coverage`);
    if (f.filmAreaPx !== undefined) checkFiniteOrNull(f.filmAreaPx, `${name}.filmAreaPx`);
    if (f.filmFound !== undefined && typeof f.filmFound !== 'boolean') throw new TypeError(`${name}.filmFound must be true or false, received ${describeValue(f.filmFound)}`);
  });
  if (input.rupture !== undefined && input.rupture !== null) checkRupture(input.rupture);
  checkFiniteOrNull(input.thinBelowNm, 'input.thinBelowNm');
  if (!Array.isArray(input.fits)) throw new TypeError(`input.fits must be an array, received ${describeValue(input.fits)}`);
  input.fits.forEach((fit, i) => {
    checkString(fit.model, `input.fits[${i}].model`);
    checkString(fit.formula, `input.fits[${i}].formula`);
    checkRecord(fit.parameters, `input.fits[${i}].parameters`);
    if (!Array.isArray(fit.curve)) throw new TypeError(`input.fits[${i}].curve must be an array of [time_s, thickness_nm], received ${describeValue(fit.curve)}`);
  });
  checkRecord(input.settings, 'input.settings');
  checkRecord(input.calibration, 'input.calibration', true);
  checkStringArray(input.warnings, 'input.warnings');
  if (input.lastMap !== undefined && input.lastMap !== null) checkMapReportInput(input.lastMap, 'input.lastMap');
}

function checkRupture(rupture: SeriesRupture): void {
  checkRecord(rupture, 'input.rupture');
  checkString(rupture.lastFrame, 'input.rupture.lastFrame');
  checkString(rupture.firstFrame, 'input.rupture.firstFrame');
  for (const key of ['lastTimeS', 'firstTimeS', 'timeS'] as const) {
    if (typeof rupture[key] !== 'number' || !Number.isFinite(rupture[key])) throw new RangeError(`input.rupture.${key} must be a finite number, received ${describeValue(rupture[key])}`);
  }
  if (!(rupture.lastTimeS <= rupture.timeS && rupture.timeS <= rupture.firstTimeS)) {
    throw new RangeError(`input.rupture.timeS must lie between lastTimeS and firstTimeS, received ${rupture.lastTimeS}, ${rupture.timeS}, ${rupture.firstTimeS}`);
  }
}

/** The headline of a ruptured series: the sentence, and what it means for the fits. */
function ruptureHeadline(rupture: SeriesRupture): string {
  return `<section class="card" id="rupture" style="border-left: 5px solid ${ruptureColour}">`
    + `<h2 style="color: ${ruptureColour}">${escapeHtml(describeRuptureLine(rupture))}</h2>`
    + `<p class="note">The film is gone from ${escapeHtml(rupture.firstFrame)} on (no film area found in it or any later frame). `
    + `Curves and drainage fits stop there: the fits use the frames up to ${escapeHtml(rupture.lastFrame)}, `
    + 'and no threshold crossing is predicted past the rupture. The rupture time is fixed only to within the interval between the two frames.</p></section>';
}

function crossingTile(crossing: DrainageFitSummary['crossing']): string {
  if (!crossing) return tile('Threshold crossing', '—', false, 'no fit with a crossing');
  const label = `${crossing.quantity === 'min' ? 'Minimum' : 'Mean'} reaches threshold`;
  if (crossing.beyondRupture) return tile(label, '—', false, 'the film ruptured first; not predicted past the rupture');
  if (crossing.timeS === null) return tile(label, '—', false, 'no crossing predicted');
  const interval = crossing.lowS !== null && crossing.highS !== null ? `${formatFixed(crossing.lowS, 1)}–${formatFixed(crossing.highS, 1)} s` : '';
  const note = [interval, crossing.extrapolated ? 'extrapolated beyond the last frame' : 'within the observed frames'].filter(Boolean).join(' · ');
  return tile(label, `${formatFixed(crossing.timeS, 1)} s`, crossing.extrapolated, note);
}

/** The observed figures first (first thin region, recent thinning), then reliable predictions only. */
function observationTiles(o: ReportSeriesObservations): string[] {
  const tiles = [
    o.first_thin
      ? tile('First thin region', `${formatFixed(o.first_thin.time_s, 1)} s`, true, `frame ${o.first_thin.frame}`)
      : tile('First thin region', 'none', false, 'no frame has a thin region'),
  ];
  const r = o.recent_thinning;
  if (r) {
    tiles.push(tile('Recent thinning', `${formatFixed(-r.rate_nm_per_s, 2)} nm/s`, false,
      `mean thickness, last ${r.frames} frames (${formatFixed(r.from_s, 1)}–${formatFixed(r.to_s, 1)} s)${r.standard_error_nm_per_s === null ? '' : ` · ±${formatFixed(r.standard_error_nm_per_s, 2)}`}`));
  }
  for (const p of o.predictions) {
    const label = `${p.quantity === 'min' ? 'Minimum' : 'Mean'} reaches ${formatFixed(p.threshold_nm, 0)} nm`;
    if (p.time_s === null) tiles.push(tile(label, 'no reliable prediction', false, p.reason ?? ''));
    else if (p.reason) tiles.push(tile(label, `${formatFixed(p.time_s, 1)} s`, false, p.reason));
    else tiles.push(tile(label, `≈ ${formatFixed(p.time_s, 1)} s`, p.extrapolated,
      `the laws agree: ${formatFixed(p.range_s![0], 1)}–${formatFixed(p.range_s![1], 1)} s${p.extrapolated ? ' · extrapolated beyond the last frame' : ''}`));
  }
  return tiles;
}

/** Full HTML document (UTF-8 text) of a series report. */
export function renderSeriesReport(input: SeriesReportInput): string {
  checkSeriesReportInput(input);
  const frames = [...input.frames].sort((a, b) => a.timeS - b.timeS);
  const last = frames[frames.length - 1] as SeriesFrameRow | undefined;
  const rupture = input.rupture ?? null;
  // The last figures of the film: after a rupture, of the last frame with film.
  const lastFilm = ([...frames].reverse().find((f) => f.filmFound !== false) ?? last) as SeriesFrameRow | undefined;
  const lastNote = rupture && lastFilm ? `${lastFilm.frame}, before the rupture` : '';
  const crossingFit = input.fits.find((f) => f.crossing && f.crossing.timeS !== null) ?? input.fits.find((f) => f.crossing);
  const observations = input.observations ?? null;
  const ruptureTile = rupture
    ? [tile('Rupture', `${formatSecondsShort(rupture.timeS)} s`, true, `between ${formatSecondsShort(rupture.lastTimeS)} and ${formatSecondsShort(rupture.firstTimeS)} s`)]
    : [];
  // What the frames show leads; a prediction follows only where the drainage laws agree.
  const tiles = [
    ...(observations ? [observationTiles(observations)[0], ...ruptureTile, ...observationTiles(observations).slice(1)] : ruptureTile),
    tile('Frames', String(frames.length)),
    tile('Time span', frames.length === 0 ? '—' : `${formatFixed(frames[0].timeS, 0)}–${formatFixed(last?.timeS, 0)} s`),
    tile('Last median', formatNm(lastFilm?.medianNm ?? null), false, lastNote),
    tile('Last minimum', formatNm(lastFilm?.minNm ?? null), false, lastNote),
    ...(observations ? [] : [crossingTile(crossingFit?.crossing ?? null)]),
  ];
  const thinChart = renderThinFractionChart(frames, rupture);
  const sections = [
    ...(rupture ? [ruptureHeadline(rupture)] : []),
    `<div class="tiles">${tiles.join('')}</div>`,
    `<section class="card" id="drainage"><h2>Thickness against time <span class="sub">${input.thinBelowNm === null ? 'no thin threshold set'
      : `thin below ${escapeHtml(formatNm(input.thinBelowNm))}`}; dashed: fitted curves and predicted crossings</span></h2>`
      + `${renderDrainageChart(frames, input.fits, input.thinBelowNm, rupture)}`
      + (thinChart ?? '<p class="note">No thin fraction: no thin threshold was set.</p>') + '</section>',
    renderFrameViewer(frames),
    ...(input.flow ? [renderFlowSection(input.flow)] : []),
    `<section class="card" id="fits"><h2>Drainage fits</h2>${renderFitsTable(input.fits)}`
      + '<p class="note">Crossings beyond the last frame are extrapolations of the fitted model, not observations'
      + `${rupture ? `; the fits use the frames up to ${escapeHtml(rupture.lastFrame)} (the last with film), and no crossing is predicted past the rupture` : ''}.</p></section>`,
    `<section class="card" id="frame-table"><h2>All frames</h2><details${frames.length <= 30 ? ' open' : ''}><summary>${frames.length} frames</summary>`
      + `${renderFramesTable(frames)}</details></section>`,
  ];
  const nav: Array<[string, string]> = [...(rupture ? [['rupture', 'Rupture'] as [string, string]] : []), ['drainage', 'Drainage'], ['frames', 'Frames'], ...(input.flow ? [['flow', 'Flow'] as [string, string]] : []), ['fits', 'Fits'], ['frame-table', 'All frames']];
  let data: Record<string, unknown> = {};
  if (input.lastMap) {
    const map = renderMapSections(input.lastMap, 'input.lastMap', { parameterTables: false });
    sections.push(`<h2 class="part" id="frame-map">Map view: ${escapeHtml(input.lastMap.title)}</h2>`, ...map.sections);
    nav.push(['frame-map', 'Map view']);
    data = map.data;
  }
  sections.push(`<div class="two-col">${renderParameterSections(input.settings, input.calibration)}</div>`);
  nav.push(['settings', 'Settings']);
  const warnings = [...input.warnings, ...(input.lastMap?.warnings ?? []).map((w) => `${input.lastMap?.title}: ${w}`)];
  return renderPage({
    kind: 'Photo series', title: input.title, generatedAt: input.generatedAt, nav, sections, warnings,
    data: {
      ...data,
      'lamella-series-data': {
        thinBelowNm: input.thinBelowNm,
        rupture,
        frames: frames.map((f) => ({ frame: f.frame, timeS: f.timeS, meanNm: f.meanNm, medianNm: f.medianNm, minNm: f.minNm,
          thinFraction: f.thinFraction, thinRegions: f.thinRegions, coverage: f.coverage,
          filmAreaPx: f.filmAreaPx ?? null, filmFound: f.filmFound !== false })),
      },
    },
  });
}
