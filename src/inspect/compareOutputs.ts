/**
 * The pictures, JSON record and report of a comparison (`lamella compare`): `difference.png` (a
 * diverging picture with its colour bar), `compare.json` (schemas/compare.schema.json) and the
 * self-contained `report.html`.
 */
import { composeImagePng } from '../io/composeImage.js';
import { thicknessHistogram } from '../map/statistics.js';
import { PixelStatus } from '../map/types.js';
import { escapeHtml } from '../report/escapeHtml.js';
import { formatFixed } from '../report/formatNumber.js';
import { imageDataUri } from '../report/imageDataUri.js';
import { renderPage } from '../report/pageShell.js';
import { renderHistogram } from '../report/svgHistogram.js';
import { LAMELLA_VERSION } from '../version.js';
import { divergingColour, divergingRaster, symmetricLimit, type Comparison } from './compareMaps.js';
import { UNIFORMITY_FORMULAS } from './uniformity.js';

export const COMPARE_SCHEMA_VERSION = 1;

/** The difference (or, with a duration, the rate) as a picture with a colour bar: blue = thinner after, red = thicker. */
export async function differencePng(c: Comparison, title: string): Promise<Buffer> {
  const values = c.rateNmPerMin ?? c.differenceNm;
  const unit = c.rateNmPerMin ? 'nm/min' : 'nm';
  const limit = symmetricLimit(values);
  const margin = 16;
  const top = 40;
  const barWidth = 18;
  const panel = 110;
  const canvasWidth = c.width + 2 * margin + panel;
  const canvasHeight = c.height + top + margin + 4;
  const stops: string[] = [];
  for (let s = 0; s <= 32; s++) {
    const [r, g, b] = divergingColour(1 - (2 * s) / 32);
    stops.push(`<stop offset="${((s / 32) * 100).toFixed(2)}%" stop-color="rgb(${r},${g},${b})"/>`);
  }
  const fmt = (v: number): string => (Math.abs(v) >= 100 ? v.toFixed(0) : v.toFixed(1));
  const barHeight = c.height;
  const ticks = [limit, limit / 2, 0, -limit / 2, -limit].map((v) => {
    const y = top + ((limit - v) / (2 * limit)) * barHeight;
    return `<line x1="${barWidth}" y1="${y.toFixed(1)}" x2="${barWidth + 5}" y2="${y.toFixed(1)}" stroke="#222"/><text x="${barWidth + 8}" y="${(y + 4).toFixed(1)}" font-size="11">${v > 0 ? '+' : ''}${fmt(v)}</text>`;
  });
  const bar = `<svg xmlns="http://www.w3.org/2000/svg" width="${panel}" height="${canvasHeight}" font-family="DejaVu Sans, sans-serif" fill="#222">
<defs><linearGradient id="d" x1="0" y1="0" x2="0" y2="1">${stops.join('')}</linearGradient></defs>
<text x="0" y="${top - 8}" font-size="11">${unit}</text>
<rect x="0" y="${top}" width="${barWidth}" height="${barHeight}" fill="url(#d)" stroke="#222"/>
${ticks.join('\n')}
<rect x="0" y="${Math.min(canvasHeight - 12, top + barHeight + 2)}" width="10" height="10" fill="rgb(128,128,128)"/><text x="14" y="${Math.min(canvasHeight - 3, top + barHeight + 11)}" font-size="10">no value</text>
</svg>`;
  const heading = `<svg xmlns="http://www.w3.org/2000/svg" width="${canvasWidth}" height="${top}" font-family="DejaVu Sans, sans-serif" fill="#222"><text x="${margin}" y="24" font-size="15" font-weight="bold">${escapeHtml(title)}</text></svg>`;
  return composeImagePng({
    canvasWidth,
    canvasHeight,
    background: '#ffffff',
    image: { data: divergingRaster(values, limit), width: c.width, height: c.height, channels: 3 },
    imageLeft: margin,
    imageTop: top,
    overlays: [{ svg: heading, left: 0, top: 0 }, { svg: bar, left: c.width + 2 * margin, top: 0 }],
  });
}

/** The JSON record `compare.json`. */
export function compareJson(c: Comparison, before: { path: string; kind: 'map' | 'photo' }, after: { path: string; kind: 'map' | 'photo' }, warnings: readonly string[]): Record<string, unknown> {
  return {
    lamella_compare_record: 1,
    schema_version: COMPARE_SCHEMA_VERSION,
    lamella_version: LAMELLA_VERSION,
    before: { file: before.path, kind: before.kind },
    after: { file: after.path, kind: after.kind },
    width_px: c.width,
    height_px: c.height,
    difference: 'after - before, nm (negative: thinner after)',
    shift_px: [c.shiftPx[0], c.shiftPx[1]],
    duration_s: c.durationS,
    compared_px: c.comparedPx,
    statistics_nm: { ...c.statistics },
    rate_statistics_nm_per_min: c.rateStatistics ? { ...c.rateStatistics } : null,
    change: c.change,
    uniformity: { ...c.uniformity },
    uniformity_formulas: { ...UNIFORMITY_FORMULAS },
    uniformity_of: c.change === 'removed' ? 'the amount removed (before - after)' : 'the amount added (after - before)',
    warnings: [...warnings],
    caution: 'Thickness from a photograph is an estimate, not a substitute for qualified metrology (ellipsometry, reflectometry, profilometry) for release or safety decisions.',
  };
}

/** The comparison report (self-contained HTML). */
export function compareReport(c: Comparison, record: Record<string, unknown>, png: Buffer, title: string): string {
  const s = c.statistics;
  const rate = c.rateStatistics;
  const tile = (label: string, value: string, note = ''): string =>
    `<div class="tile"><div class="label">${escapeHtml(label)}</div><div class="value">${escapeHtml(value)}</div>${note ? `<div class="tile-note">${escapeHtml(note)}</div>` : ''}</div>`;
  const nm = (v: number | null): string => (v === null ? '—' : `${formatFixed(v, 1)} nm`);
  const tiles = [
    tile('Mean change', nm(s.mean_nm), c.change === 'removed' ? 'thinner after (removed)' : c.change === 'added' ? 'thicker after (added)' : ''),
    ...(rate ? [tile('Mean rate', rate.mean_nm === null ? '—' : `${formatFixed(rate.mean_nm, 2)} nm/min`, `over ${formatFixed(c.durationS, 0)} s`)] : []),
    tile('(max-min)/(2*mean)', c.uniformity.range_over_twice_mean === null ? '—' : `${formatFixed(c.uniformity.range_over_twice_mean * 100, 2)} %`, `of ${String(record.uniformity_of)}`),
    tile('Compared', `${c.comparedPx} px`, `shift ${c.shiftPx[0]}, ${c.shiftPx[1]} px`),
  ];
  const rows = (st: typeof s, unit: string): string =>
    (['mean_nm', 'median_nm', 'std_nm', 'min_nm', 'max_nm', 'p05_nm', 'p95_nm'] as const)
      .map((k) => `<tr><th>${k.replace('_nm', '')}</th><td>${st[k] === null ? '—' : `${formatFixed(st[k], 2)} ${unit}`}</td></tr>`).join('');
  const uniformityRows = (Object.keys(UNIFORMITY_FORMULAS) as Array<keyof typeof UNIFORMITY_FORMULAS>)
    .map((k) => `<tr><th><code>${escapeHtml(UNIFORMITY_FORMULAS[k])}</code></th><td>${c.uniformity[k] === null ? '—' : `${formatFixed(c.uniformity[k]! * 100, 2)} %`}</td></tr>`).join('');
  const status = new Uint8Array(c.differenceNm.length);
  for (let i = 0; i < status.length; i++) status[i] = Number.isFinite(c.differenceNm[i]) ? PixelStatus.ok : PixelStatus.excluded;
  const hist = thicknessHistogram(c.differenceNm, status, s.min_nm, s.max_nm);
  const histogram = renderHistogram({ title: 'Histogram of the change', xLabel: 'after − before (nm)', yLabel: 'Pixels (count)', id: 'difference-histogram', edges: hist.edgesNm, counts: hist.counts, colourOf: () => '#5a6f80', widthPx: 580, heightPx: 280 });
  const before = record.before as { file: string; kind: string };
  const after = record.after as { file: string; kind: string };
  const sections = [
    `<div class="tiles">${tiles.join('')}</div>`,
    `<section class="card" id="difference"><h2>Difference map <span class="sub">${c.width} × ${c.height} px</span></h2><figure><img src="${imageDataUri(png, 'difference.png')}" alt="Difference map" style="max-width:100%"/><figcaption>${escapeHtml(c.rateNmPerMin ? 'Rate, nm/min' : 'after − before, nm')}: blue thinner after, red thicker, grey no value in one of the maps.</figcaption></figure>`
      + `<p class="note">Before: ${escapeHtml(before.file)} (${escapeHtml(before.kind)}); after: ${escapeHtml(after.file)} (${escapeHtml(after.kind)}).</p></section>`,
    `<div class="two-col"><section class="card" id="statistics"><h2>Statistics of the change</h2><table class="values">${rows(s, 'nm')}</table>${rate ? `<h3>Rate</h3><table class="values">${rows(rate, 'nm/min')}</table>` : ''}</section>`
      + `<section class="card" id="uniformity"><h2>Uniformity <span class="sub">of ${escapeHtml(String(record.uniformity_of))}</span></h2><table class="values">${uniformityRows}</table><p class="note">Each figure named by its formula (common practice); std is the sample standard deviation (1σ).</p></section></div>`,
    `<section class="card" id="histogram">${histogram}</section>`,
  ];
  return renderPage({
    kind: 'Comparison',
    title,
    generatedAt: new Date().toISOString(),
    nav: [['difference', 'Difference'], ['statistics', 'Statistics'], ['uniformity', 'Uniformity'], ['histogram', 'Histogram']],
    sections,
    warnings: [...(record.warnings as string[])],
    data: {},
  });
}
