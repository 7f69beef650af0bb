/**
 * `renderMapReport(input)`: the self-contained HTML report of one thickness map (written as
 * `report.html` by `lamella map`). Checks the input, then assembles the map sections in a page.
 */
import { checkRecord, checkString, checkStringArray } from './checkInput.js';
import { checkHistogram } from './svgHistogram.js';
import { checkFilmArea, checkFitQuality } from './filmAreaSection.js';
import { checkReportLight } from './lightSection.js';
import { renderMapSections } from './mapSections.js';
import { renderPage } from './pageShell.js';
import type { MapReportInput } from './types.js';

export function checkMapReportInput(input: MapReportInput, name = 'input'): void {
  checkRecord(input, name);
  checkString(input.title, `${name}.title`);
  checkString(input.generatedAt, `${name}.generatedAt`);
  checkRecord(input.colourBar, `${name}.colourBar`);
  checkRecord(input.stats, `${name}.stats`);
  checkRecord(input.histogram, `${name}.histogram`);
  checkHistogram(input.histogram.edgesNm, input.histogram.counts, `${name}.histogram`);
  if (!Array.isArray(input.thinRegions)) throw new TypeError(`${name}.thinRegions must be an array, received ${typeof input.thinRegions}`);
  checkRecord(input.settings, `${name}.settings`);
  checkRecord(input.fitted, `${name}.fitted`);
  checkRecord(input.calibration, `${name}.calibration`, true);
  checkStringArray(input.warnings, `${name}.warnings`);
  checkFilmArea(input.filmArea, `${name}.filmArea`);
  checkFitQuality(input.fitQuality, `${name}.fitQuality`);
  checkReportLight(input.light, `${name}.light`);
}

/** Full HTML document (UTF-8 text) of a map report. */
export function renderMapReport(input: MapReportInput): string {
  checkMapReportInput(input);
  const rendered = renderMapSections(input);
  return renderPage({
    kind: 'Thickness map',
    title: input.title,
    generatedAt: input.generatedAt,
    nav: rendered.nav,
    sections: rendered.sections,
    warnings: input.warnings,
    data: rendered.data,
  });
}
