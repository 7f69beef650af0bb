/**
 * `renderSeriesReport(input)`: the self-contained HTML report of a photo series (written as
 * `report.html` by `lamella series`): drainage charts with fits and crossings, a frame slider,
 * fit and frame tables, and the full map view of the chosen frame when given.
 */
import { checkFiniteOrNull, checkRecord, checkString, checkStringArray, describeValue } from './checkInput.js';
import { escapeHtml } from './escapeHtml.js';
import { formatFixed, formatNm } from './formatNumber.js';
import { renderFrameViewer } from './frameViewer.js';
import { renderMapSections, renderParameterSections, tile } from './mapSections.js';
import { renderPage } from './pageShell.js';
import { checkMapReportInput } from './renderMapReport.js';
import { renderDrainageChart, renderThinFractionChart } from './seriesCharts.js';
import { renderFitsTable, renderFramesTable } from './seriesTables.js';
import type { DrainageFitSummary, SeriesFrameRow, SeriesReportInput } from './types.js';

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
  });
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

function crossingTile(crossing: DrainageFitSummary['crossing']): string {
  if (!crossing) return tile('Threshold crossing', '—', false, 'no fit with a crossing');
  const label = `${crossing.quantity === 'min' ? 'Minimum' : 'Mean'} reaches threshold`;
  if (crossing.timeS === null) return tile(label, '—', false, 'no crossing predicted');
  const interval = crossing.lowS !== null && crossing.highS !== null ? `${formatFixed(crossing.lowS, 1)}–${formatFixed(crossing.highS, 1)} s` : '';
  const note = [interval, crossing.extrapolated ? 'extrapolated beyond the last frame' : 'within the observed frames'].filter(Boolean).join(' · ');
  return tile(label, `${formatFixed(crossing.timeS, 1)} s`, crossing.extrapolated, note);
}

/** Full HTML document (UTF-8 text) of a series report. */
export function renderSeriesReport(input: SeriesReportInput): string {
  checkSeriesReportInput(input);
  const frames = [...input.frames].sort((a, b) => a.timeS - b.timeS);
  const last = frames[frames.length - 1] as SeriesFrameRow | undefined;
  const crossingFit = input.fits.find((f) => f.crossing && f.crossing.timeS !== null) ?? input.fits.find((f) => f.crossing);
  const tiles = [
    tile('Frames', String(frames.length)),
    tile('Time span', frames.length === 0 ? '—' : `${formatFixed(frames[0].timeS, 0)}–${formatFixed(last?.timeS, 0)} s`),
    tile('Last median', formatNm(last?.medianNm ?? null)),
    tile('Last minimum', formatNm(last?.minNm ?? null)),
    crossingTile(crossingFit?.crossing ?? null),
  ];
  const thinChart = renderThinFractionChart(frames);
  const sections = [
    `<div class="tiles">${tiles.join('')}</div>`,
    `<section class="card" id="drainage"><h2>Thickness against time <span class="sub">${input.thinBelowNm === null ? 'no thin threshold set'
      : `thin below ${escapeHtml(formatNm(input.thinBelowNm))}`}; dashed: fitted curves and predicted crossings</span></h2>`
      + `${renderDrainageChart(frames, input.fits, input.thinBelowNm)}`
      + (thinChart ?? '<p class="note">No thin fraction: no thin threshold was set.</p>') + '</section>',
    renderFrameViewer(frames),
    `<section class="card" id="fits"><h2>Drainage fits</h2>${renderFitsTable(input.fits)}`
      + '<p class="note">Crossings beyond the last frame are extrapolations of the fitted model, not observations.</p></section>',
    `<section class="card" id="frame-table"><h2>All frames</h2><details${frames.length <= 30 ? ' open' : ''}><summary>${frames.length} frames</summary>`
      + `${renderFramesTable(frames)}</details></section>`,
  ];
  const nav: Array<[string, string]> = [['drainage', 'Drainage'], ['frames', 'Frames'], ['fits', 'Fits'], ['frame-table', 'All frames']];
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
        frames: frames.map((f) => ({ frame: f.frame, timeS: f.timeS, meanNm: f.meanNm, medianNm: f.medianNm, minNm: f.minNm,
          thinFraction: f.thinFraction, thinRegions: f.thinRegions, coverage: f.coverage })),
      },
    },
  });
}
