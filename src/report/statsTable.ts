/**
 * Summary statistics of a thickness map as a table with plain-language names and units.
 * Known keys (the map's statistics record) get a label and unit; other keys are shown as given.
 */
import { escapeHtml } from './escapeHtml.js';
import { formatNm, formatPercent, formatSignificant } from './formatNumber.js';

type Kind = 'nm' | 'share' | 'count';

export const statLabels: Record<string, { label: string; kind: Kind }> = {
  mean_nm: { label: 'Mean thickness', kind: 'nm' },
  median_nm: { label: 'Median thickness', kind: 'nm' },
  std_nm: { label: 'Standard deviation', kind: 'nm' },
  min_nm: { label: 'Minimum', kind: 'nm' },
  max_nm: { label: 'Maximum', kind: 'nm' },
  p05_nm: { label: '5th percentile', kind: 'nm' },
  p95_nm: { label: '95th percentile', kind: 'nm' },
  uniformity: { label: 'Non-uniformity (p95 − p05) / median', kind: 'share' },
  coverage: { label: 'Coverage (pixels with an estimate)', kind: 'share' },
  thin_fraction: { label: 'Thin fraction', kind: 'share' },
  thin_regions: { label: 'Thin regions', kind: 'count' },
  film_area_px: { label: 'Film area (pixels; the statistics are over these)', kind: 'count' },
};

/** One statistic formatted by its kind: nm with unit, share as %, count as integer. */
export function formatStat(key: string, value: number | null): string {
  const kind = statLabels[key]?.kind;
  if (kind === 'nm') return formatNm(value);
  if (kind === 'share') return formatPercent(value);
  return formatSignificant(value, 6);
}

export function renderStatsTable(stats: Record<string, number | null>): string {
  const rows = Object.entries(stats).map(([key, value]) => {
    const label = statLabels[key]?.label ?? key;
    return `<tr><th scope="row">${escapeHtml(label)}</th><td class="num">${escapeHtml(formatStat(key, value))}</td></tr>`;
  });
  if (rows.length === 0) return '<p class="muted">(none)</p>';
  return `<table class="values stats"><tbody>${rows.join('')}</tbody></table>`;
}
