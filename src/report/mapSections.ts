/**
 * The sections of a map report (also embedded in a series report for its chosen frame):
 * key figures, photo and map side by side with the pointer readout and colour bar, histogram,
 * column profile, thin regions (table and outlines on the map), the film area and fit quality,
 * the light on the film (its fitted field as a small picture),
 * statistics and parameters. A map that found no film says so instead of giving statistics.
 */
import { checkColourStops, colourAtNm } from './colourRamp.js';
import { encodeFloat32Base64 } from './encodeFloat32Base64.js';
import { escapeHtml } from './escapeHtml.js';
import { NO_FILM_TEXT, renderFilmAreaCard } from './filmAreaSection.js';
import { renderLightCard } from './lightSection.js';
import { renderInspectionCard } from './inspectionSection.js';
import { formatFixed, formatNm, formatPercent } from './formatNumber.js';
import { imageDataUri } from './imageDataUri.js';
import { niceDomain } from './niceTicks.js';
import { checkReportGrid, columnProfile, finiteRange } from './reportGrid.js';
import { renderStatsTable } from './statsTable.js';
import { renderLineChart } from './svgChart.js';
import { renderColourBar } from './svgColourBar.js';
import { renderHistogram } from './svgHistogram.js';
import { renderThinRegionOutlines, renderThinRegionTable } from './thinRegions.js';
import { statusLabels } from './statusLabels.js';
import type { MapReportInput } from './types.js';
import { renderValueTable } from './valueTable.js';

export interface RenderedSections {
  sections: string[];
  nav: Array<[string, string]>;
  data: Record<string, unknown>;
}

export const thresholdColour = '#c0392b';

export interface MapSectionOptions {
  /** Include the settings and calibration tables (a series report shows its own instead). */
  parameterTables: boolean;
}

export function renderMapSections(input: MapReportInput, name = 'input', options: MapSectionOptions = { parameterTables: true }): RenderedSections {
  const grid = input.grid;
  checkReportGrid(grid, `${name}.grid`);
  const photoUri = imageDataUri(input.photoPng, `${name}.photoPng`);
  const mapUri = imageDataUri(input.mapPng, `${name}.mapPng`);
  const stops = checkColourStops(input.colourBar?.stops, `${name}.colourBar.stops`);
  const thin = input.thinBelowNm;
  if (thin !== null && !Number.isFinite(thin)) throw new RangeError(`${name}.thinBelowNm must be a finite number or null, received ${thin}`);
  const column = input.profileColumn ?? Math.floor(grid.originalWidth / 2);
  if (!Number.isInteger(column) || column < 0 || column >= grid.originalWidth) {
    throw new RangeError(`${name}.profileColumn must be an integer pixel column 0..${grid.originalWidth - 1}, received ${column}`);
  }
  const W = grid.originalWidth;
  const H = grid.originalHeight;
  const cross = `<line class="cross-h" x1="0" x2="${W}" y1="0" y2="0" visibility="hidden"/><line class="cross-v" x1="0" x2="0" y1="0" y2="${H}" visibility="hidden"/>`;
  const profileLine = `<line class="profile-line" x1="${column + 0.5}" x2="${column + 0.5}" y1="0.5" y2="${H - 0.5}"/>`;
  const marks = (inner: string) => `<svg class="marks" viewBox="0 0 ${W} ${H}" preserveAspectRatio="none" aria-hidden="true">${inner}</svg>`;
  // keep a tall (portrait) photo within about one screen height
  const fit = ` style="max-width: calc(78vh * ${(W / H).toFixed(4)})"`;
  const thinText = thin === null ? 'no thin threshold set' : `thin below ${formatNm(thin)}`;

  const notes: string[] = [];
  if (grid.step > 1) {
    notes.push(`The embedded grid is downsampled by ${grid.step}: each value stands for a block of ${grid.step} × ${grid.step} pixels `
      + `of the ${W} × ${H} photo (${grid.width} × ${grid.height} cells), so the readout may differ from the full-resolution map files.`);
  }
  if (input.downsampleNote) notes.push(String(input.downsampleNote));

  const area = input.filmArea ?? null;
  const fitQuality = input.fitQuality ?? null;
  const noFilm = area !== null && !area.found;
  // The film area is outlined on the photo (by the caller) wherever part of the photo is not film.
  const outlined = area !== null && area.found && area.areaPx < W * H;
  const tiles = noFilm ? [tile('Film', NO_FILM_TEXT, true, 'no statistics, no thin regions')] : [
    tile('Median thickness', formatNm(input.stats.median_nm)),
    tile('5–95 % range', input.stats.p05_nm == null || input.stats.p95_nm == null ? '—' : `${formatFixed(input.stats.p05_nm, 0)}–${formatFixed(input.stats.p95_nm, 0)} nm`),
    tile('Coverage', formatPercent(input.stats.coverage)),
    ...(input.stats.thin_fraction !== undefined ? [tile('Thin fraction', formatPercent(input.stats.thin_fraction), (input.stats.thin_fraction ?? 0) > 0)] : []),
    tile('Thin regions', String(input.thinRegions.length), input.thinRegions.length > 0),
    ...(area !== null ? [tile('Film area', formatPercent(area.fraction), false, 'of the photo')] : []),
    ...(input.inspection?.verdict ? [inspectionTile(input.inspection)] : []),
    ...(fitQuality !== null ? [tile('Model fit', fitQuality.verdict, fitQuality.verdict === 'poor', `median ΔE2000 ${formatFixed(fitQuality.median_delta_e2000, 2)}`)] : []),
  ];

  const view = `<section class="card" id="map-view"><h2>Photo and thickness map <span class="sub">${W} × ${H} px · ${escapeHtml(thinText)}</span></h2>
<div class="pair">
<figure${fit}><div class="stage photo"><img src="${photoUri}" alt="Photo"/>${marks(profileLine + cross)}</div><figcaption>${outlined ? 'Photo; film area outlined (dashed cyan and black line)' : 'Photo'}</figcaption></figure>
<figure${fit}><div class="stage map"><img src="${mapUri}" alt="Thickness map"/>${marks(renderThinRegionOutlines(input.thinRegions) + profileLine + cross)}</div>`
    + `<figcaption>Thickness map; thin regions outlined; dashed line: profile column</figcaption></figure>
</div>
<div class="readout" id="readout"><span class="hint">Under the pointer:</span>`
    + '<span>x <b id="readout-x">—</b> y <b id="readout-y">—</b> px</span>'
    + `<span>thickness <b id="readout-thickness">—</b></span><span title="${escapeHtml(CONFIDENCE_MEANING)}">confidence <b id="readout-confidence">—</b></span>`
    + '<span id="readout-cell" class="muted"></span><span id="readout-status" class="muted"></span><span id="readout-flag" class="flag"></span></div>'
    + '<p class="note">Point at the photo or the map to read the thickness (to 0.1 nm) and confidence stored for that pixel (coordinates in the original photo); click to move the profile to that column, or drag to draw the profile along any line; point along the profile chart to follow the line on the images.</p>'
    + `<p class="note"><b>Confidence</b> (0 to 1): ${escapeHtml(CONFIDENCE_MEANING)}</p>`
    + renderColourBar({ minNm: input.colourBar.minNm, maxNm: input.colourBar.maxNm, stops }, thin, 1000)
    + notes.map((n) => `<p class="note downsample-note">${escapeHtml(n)}</p>`).join('')
    + '</section>';

  const histogram = renderHistogram({
    title: 'Histogram of thickness', xLabel: 'Thickness (nm)', yLabel: 'Pixels (count)', id: 'histogram-chart',
    edges: input.histogram.edgesNm, counts: input.histogram.counts, colourOf: (nm) => colourAtNm(stops, nm),
    verticalLines: thin === null ? [] : [{ value: thin, label: `thin ${formatFixed(thin, 0)} nm`, colour: thresholdColour }],
    widthPx: 580, heightPx: 300,
  });
  const range = finiteRange(grid.thicknessNm);
  const yDomain = niceDomain(Math.min(range?.[0] ?? 0, thin ?? Infinity), Math.max(range?.[1] ?? 1, thin ?? -Infinity), 5);
  const profile = renderLineChart({
    title: 'Thickness profile along a line', xLabel: 'Distance along the line from its start (px)', yLabel: 'Thickness (nm)', id: 'profile-chart',
    xDomain: [0, Math.ceil(Math.hypot(W, H))], yDomain, widthPx: 580, heightPx: 300,
    series: [{ label: 'thickness along the column', points: columnProfile(grid, column), colour: '#0e6b70' }],
    horizontalLines: thin === null ? [] : [{ value: thin, label: `thin threshold ${formatFixed(thin, 1)} nm`, colour: thresholdColour }],
  });
  const charts = `<div class="two-col">
<section class="card" id="histogram"><h2>Histogram</h2>${histogram}</section>
<section class="card" id="profile"><h2>Profile <span class="sub" id="profile-what"><span id="profile-kind">column x = </span><span id="profile-column">${column}</span><span id="profile-unit"> px</span></span></h2>${profile}<p class="note"><button type="button" id="profile-csv">Download the profile as CSV</button> distance, x, y, thickness and confidence of each sample (the embedded grid's values).</p></section>
</div>`;

  const regions = `<section class="card" id="thin-regions"><h2>Thin regions <span class="sub">${input.thinRegions.length} · ${escapeHtml(thinText)}</span></h2>`
    + `${renderThinRegionTable(input.thinRegions)}</section>`;

  const tables = `<div class="two-col">
<section class="card" id="statistics"><h2>Statistics</h2>${noFilm ? `<p class="no-film">${escapeHtml(NO_FILM_TEXT)}.</p>` : renderStatsTable(input.stats)}</section>
<section class="card" id="fitted"><h2>Fitted photo parameters</h2>${renderValueTable(input.fitted)}</section>
${options.parameterTables ? renderParameterSections(input.settings, input.calibration) : ''}
</div>`;

  return {
    sections: [`<div class="tiles">${tiles.join('')}</div>`, view, renderInspectionCard(input.inspection), renderFilmAreaCard(area, fitQuality, W * H), renderLightCard(input.light), charts, regions, tables],
    nav: [['map-view', 'Map'], ...(input.inspection ? [['inspection', 'Inspection'] as [string, string]] : []), ['film-area', 'Film area'], ...(input.light ? [['light', 'Light'] as [string, string]] : []), ['histogram', 'Histogram'], ['profile', 'Profile'], ['thin-regions', 'Thin regions'],
      ['statistics', 'Statistics'], ...(options.parameterTables ? [['settings', 'Settings'] as [string, string]] : [])],
    data: {
      'lamella-map-data': {
        thinBelowNm: thin,
        profileColumn: column,
        grid: {
          width: grid.width, height: grid.height, step: grid.step, originalWidth: W, originalHeight: H,
          thicknessB64: encodeFloat32Base64(grid.thicknessNm), confidenceB64: encodeFloat32Base64(grid.confidence),
          statusB64: grid.status ? Buffer.from(grid.status.buffer, grid.status.byteOffset, grid.status.byteLength).toString('base64') : null,
        },
        statusLabels,
      },
    },
  };
}

/** What the confidence of a pixel means, in words (the readout, the profile chart). */
export const CONFIDENCE_MEANING =
  'how well the pixel\'s colour matches the model at the thickness given, times how clearly that thickness beats the next-best interference order. Near 1: a close match and a clear order; near 0: a poor match or orders hard to tell apart. It is not an uncertainty in nm.';

/** Settings and calibration cards (ids `settings`, `calibration`). */
export function renderParameterSections(settings: Record<string, unknown>, calibration: Record<string, unknown> | null | undefined): string {
  return `<section class="card" id="settings"><h2>Settings</h2>${renderValueTable(settings)}</section>
<section class="card" id="calibration"><h2>Calibration</h2>${calibration ? renderValueTable(calibration) : '<p class="muted">No calibration file was used.</p>'}</section>`;
}

/** A key-figure tile: label, big value, optional small note under it; `alert` gives an amber edge. */
export function tile(label: string, value: string, alert = false, note = ''): string {
  return `<div class="tile${alert ? ' alert' : ''}"><div class="label">${escapeHtml(label)}</div><div class="value">${escapeHtml(value)}</div>`
    + `${note ? `<div class="tile-note">${escapeHtml(note)}</div>` : ''}</div>`;
}

/** The verdict tile: PASS or FAIL with the share in spec. */
function inspectionTile(inspection: Record<string, unknown>): string {
  const verdict = inspection.verdict as { pass: boolean; rule: string };
  const spec = inspection.spec as { in_spec_fraction: number; text: string } | null;
  return tile('Spec', verdict.pass ? 'PASS' : 'FAIL', !verdict.pass, spec ? `${formatPercent(spec.in_spec_fraction)} in ${spec.text} · ${verdict.rule}` : verdict.rule);
}
