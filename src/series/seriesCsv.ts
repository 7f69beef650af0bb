/**
 * `series.csv`: one row per mapped frame, RFC 4180 CSV (comma separated, CRLF-free `\n` line ends
 * as most tools accept, fields quoted only when they contain a comma, quote or line break).
 * Fixed decimals: time 3, thicknesses 2, fractions 4, exposure 4; empty cell = no value. Frame
 * names a spreadsheet would run as formulas get a leading apostrophe (../io/csvCell.ts).
 * `film_area_px` (whole pixels, 0 for a frame without film) follows `coverage`, the other share
 * of the film area; a frame without film has empty statistics cells.
 */
import type { SeriesRow } from './seriesRows.js';
import { csvText } from '../io/csvCell.js';

export const SERIES_CSV_COLUMNS = [
  'frame',
  'time_s',
  'mean_nm',
  'median_nm',
  'min_nm',
  'max_nm',
  'std_nm',
  'thin_fraction',
  'thin_regions',
  'coverage',
  'film_area_px',
  'exposure',
] as const;


function fixed(value: number | null, decimals: number): string {
  return value === null || !Number.isFinite(value) ? '' : value.toFixed(decimals);
}

/** Appended when the series has a spec (`--spec`): each frame's share in spec and its verdict. */
export const SERIES_SPEC_COLUMNS = ['in_spec_fraction', 'verdict'] as const;

export function formatSeriesCsv(rows: readonly SeriesRow[]): string {
  const judged = rows.some((r) => r.specPass !== undefined);
  const lines = [[...SERIES_CSV_COLUMNS, ...(judged ? SERIES_SPEC_COLUMNS : [])].join(',')];
  for (const r of rows) {
    lines.push(
      [
        csvText(r.frame),
        fixed(r.timeS, 3),
        fixed(r.meanNm, 2),
        fixed(r.medianNm, 2),
        fixed(r.minNm, 2),
        fixed(r.maxNm, 2),
        fixed(r.stdNm, 2),
        fixed(r.thinFraction, 4),
        String(r.thinRegions),
        fixed(r.coverage, 4),
        r.filmAreaPx === null || r.filmAreaPx === undefined ? '' : String(Math.round(r.filmAreaPx)),
        fixed(r.exposure, 4),
        ...(judged ? [fixed(r.inSpecFraction ?? null, 4), r.specPass === undefined || r.specPass === null ? '' : r.specPass ? 'pass' : 'fail'] : []),
      ].join(','),
    );
  }
  return `${lines.join('\n')}\n`;
}
