/**
 * What a folder of maps holds, rebuilt from the JSON records in it (`<stem>.json` with
 * `lamella_map_record`): `summary.csv` (one row per photo) and the index page (`report.html`
 * when the folder holds more than one map: a table with thumbnails and links). Mapping more
 * photos into the folder later adds them, since both are rebuilt from every record there.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { escapeHtml } from '../report/escapeHtml.js';
import { UNIFORMITY_FORMULAS, type UniformityFigures } from './uniformity.js';

export interface FolderRecord {
  /** The record's file stem (`<stem>.json`). */
  readonly stem: string;
  readonly record: Record<string, unknown>;
}

/** The map records in a folder, by stem in natural order; files that are not map records are skipped. */
export function readFolderRecords(dir: string): FolderRecord[] {
  const out: FolderRecord[] = [];
  for (const name of readdirSync(dir)) {
    if (!name.endsWith('.json') || name.startsWith('.')) continue;
    try {
      const record = JSON.parse(readFileSync(join(dir, name), 'utf8')) as Record<string, unknown>;
      if (record && typeof record === 'object' && record.lamella_map_record !== undefined) out.push({ stem: name.slice(0, -'.json'.length), record });
    } catch {
      // Not a record of ours (or half written by someone else): not part of the summary.
    }
  }
  return out.sort((a, b) => a.stem.localeCompare(b.stem, 'en', { numeric: true }));
}

const UNIFORMITY_KEYS = Object.keys(UNIFORMITY_FORMULAS) as Array<keyof UniformityFigures>;

/** The header of `summary.csv`. */
export const SUMMARY_COLUMNS = [
  'photo', 'stem', 'film_found', 'film_area_px', 'inspected_px', 'coverage', 'mean_nm', 'median_nm', 'std_nm', 'min_nm', 'max_nm', 'p05_nm', 'p95_nm',
  ...UNIFORMITY_KEYS.map((k) => `uniformity ${UNIFORMITY_FORMULAS[k]}`),
  'spec', 'in_spec_fraction', 'verdict', 'pass_rule', 'edge_exclusion_mm', 'pixel_size_um', 'scale_source', 'thin_regions', 'warnings',
] as const;

/**
 * `summary.csv`: one row per record. Statistics and uniformity are the inspection's (over the film
 * area after edge exclusion) when the record has one, else the map's own (uniformity from them).
 */
export function summaryCsv(records: readonly FolderRecord[]): string {
  const rows = [SUMMARY_COLUMNS.map(cell).join(',')];
  for (const { stem, record } of records) rows.push(summaryRow(stem, record).map(cell).join(','));
  return `${rows.join('\n')}\n`;
}

function summaryRow(stem: string, r: Record<string, unknown>): Array<string | number | null> {
  const inspection = (r.inspection as Record<string, any> | null | undefined) ?? null;
  const stats = (inspection?.statistics ?? r.statistics ?? {}) as Record<string, number | null>;
  const filmArea = (r.film_area ?? {}) as Record<string, unknown>;
  const mapStats = (r.statistics ?? {}) as Record<string, number | null>;
  const uniformity = (inspection?.uniformity ?? uniformityFromStats(stats)) as Record<string, number | null>;
  const spec = inspection?.spec ?? null;
  const verdict = inspection?.verdict ?? null;
  const settings = (r.settings ?? {}) as Record<string, unknown>;
  return [
    String(r.photo ?? ''), stem, filmArea.found === false ? 'no' : 'yes', numOr(filmArea.area_px), inspection ? numOr(inspection.inspected_px) : numOr(filmArea.area_px),
    numOr(inspection ? inspection.coverage : mapStats.coverage),
    stats.mean_nm ?? null, stats.median_nm ?? null, stats.std_nm ?? null, stats.min_nm ?? null, stats.max_nm ?? null, stats.p05_nm ?? null, stats.p95_nm ?? null,
    ...UNIFORMITY_KEYS.map((k) => uniformity[k] ?? null),
    spec ? String(spec.text) : '', spec ? spec.in_spec_fraction : null, verdict ? (verdict.pass ? 'pass' : 'fail') : '', verdict ? String(verdict.rule) : '',
    inspection ? (inspection.edge_exclusion_mm ?? null) : null, inspection ? (inspection.scale?.pixel_size_um ?? null) : numOr(settings.pixel_size_um), inspection ? String(inspection.scale?.source ?? '') : settings.pixel_size_um ? 'pixel-size' : 'none',
    numOr(mapStats.thin_regions), Array.isArray(r.warnings) ? r.warnings.length : 0,
  ];
}

function uniformityFromStats(s: Record<string, number | null>): Record<string, number | null> {
  const { mean_nm: mean, min_nm: min, max_nm: max, std_nm: std, median_nm: median, p05_nm: p05, p95_nm: p95 } = s;
  if (mean == null || min == null || max == null) return {};
  return {
    range_over_twice_mean: mean > 0 ? (max - min) / (2 * mean) : null,
    std_over_mean: mean > 0 && std != null ? std / mean : null,
    range_over_sum: max + min > 0 ? (max - min) / (max + min) : null,
    p90_span_over_median: median && p05 != null && p95 != null ? (p95 - p05) / median : null,
  };
}

function numOr(v: unknown): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

function cell(v: string | number | null | undefined): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(Math.round(v * 1e6) / 1e6) : '';
  // Text from file names: quoted, never read as a formula by a spreadsheet.
  const safe = /^[=+\-@\t\r]/.test(v) ? `'${v}` : v;
  return /[",\n\r]/.test(safe) || safe !== v ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/** A relative link to a file in the same folder (RFC 3986 percent-encoding, `./` first: no name can become a scheme or fragment). */
function link(file: string): string {
  return `./${escapeHtml(encodeURIComponent(file))}`;
}

/**
 * The index page of a folder of maps: one table row per record with its map picture as a
 * thumbnail (when `<stem>.map.png` is there), key figures, spec share and verdict, and a link to
 * its report (when `<stem>.report.html` is there).
 */
export function folderIndexPage(dir: string, records: readonly FolderRecord[]): string {
  const pct = (v: unknown): string => (typeof v === 'number' && Number.isFinite(v) ? `${(v * 100).toFixed(1)} %` : '—');
  const nm = (v: unknown): string => (typeof v === 'number' && Number.isFinite(v) ? `${v.toFixed(1)} nm` : '—');
  const rows = records.map(({ stem, record }) => {
    const values = summaryRow(stem, record);
    const at = (name: (typeof SUMMARY_COLUMNS)[number]): string | number | null => values[SUMMARY_COLUMNS.indexOf(name)];
    const thumb = existsSync(join(dir, `${stem}.map.png`)) ? `<img src="${link(`${stem}.map.png`)}" alt="map of ${escapeHtml(stem)}" loading="lazy">` : '';
    const report = existsSync(join(dir, `${stem}.report.html`)) ? `<a href="${link(`${stem}.report.html`)}">${escapeHtml(stem)}</a>` : escapeHtml(stem);
    const verdict = String(at('verdict') ?? '');
    return `<tr><td class="thumb">${thumb}</td><td>${report}<br><small>${escapeHtml(String(record.photo ?? ''))}</small></td>`
      + `<td>${nm(at('mean_nm'))}</td><td>${nm(at('min_nm'))} – ${nm(at('max_nm'))}</td><td>${pct(at('uniformity (max-min)/(2*mean)'))}</td><td>${pct(at('uniformity std/mean (1 sigma)'))}</td>`
      + `<td>${escapeHtml(String(at('spec') || '—'))}</td><td>${pct(at('in_spec_fraction'))}</td><td class="${verdict}">${verdict ? verdict.toUpperCase() : '—'}</td><td>${String(at('warnings'))}</td></tr>`;
  });
  const failed = records.filter(({ record }) => (record.inspection as any)?.verdict?.pass === false).length;
  const judged = records.filter(({ record }) => (record.inspection as any)?.verdict).length;
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Lamella thickness maps</title>
<style>body{font:15px/1.45 system-ui,sans-serif;margin:2rem;color:#1d2530}a{color:#0b5e6b}table{border-collapse:collapse}th,td{padding:.35rem .6rem;border-bottom:1px solid #d5dbe0;text-align:left;vertical-align:middle}
td.thumb img{height:90px;display:block}td.pass{color:#17613a;font-weight:600}td.fail{color:#a8231a;font-weight:600}small{color:#5b6672}</style></head>
<body><h1>Thickness maps</h1><p>${records.length} map(s) in this folder${judged ? `; ${judged - failed} pass, ${failed} fail` : ''}. The same rows are in <a href="./summary.csv">summary.csv</a>. Uniformity over the film area after any edge exclusion, named by formula (common practice).</p>
<table><thead><tr><th>Map</th><th>Photo</th><th>Mean</th><th>Min – max</th><th>(max-min)/(2*mean)</th><th>std/mean</th><th>Spec</th><th>In spec</th><th>Verdict</th><th>Warnings</th></tr></thead><tbody>
${rows.join('\n')}
</tbody></table><p><small>Thickness maps from photographs are estimates: not a substitute for qualified metrology (ellipsometry, reflectometry, profilometry) for release or safety decisions.</small></p></body></html>
`;
}
