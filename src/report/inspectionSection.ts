/**
 * The inspection card of a map report (issue 19): the spec and the share of the inspected area in
 * it, the pass/fail verdict and its rule, the uniformity figures labelled by their formulas
 * (common practice), the edge exclusion and where the scale came from. Its input is the map
 * record's JSON `inspection` block as written.
 */
import { escapeHtml } from './escapeHtml.js';
import { formatFixed, formatNm, formatPercent } from './formatNumber.js';

type Block = Record<string, unknown>;

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

export function renderInspectionCard(inspection: Block | null | undefined): string {
  if (!inspection) return '';
  const rows: string[] = [];
  const row = (label: string, value: string, cls = ''): void => void rows.push(`<tr${cls ? ` class="${cls}"` : ''}><th>${escapeHtml(label)}</th><td>${escapeHtml(value)}</td></tr>`);
  const spec = inspection.spec as Block | null;
  const verdict = inspection.verdict as Block | null;
  if (spec) {
    row('Specification', String(spec.text));
    row('In spec', formatPercent(num(spec.in_spec_fraction)));
    row('Below spec', formatPercent(num(spec.below_fraction)));
    row('Above spec', formatPercent(num(spec.above_fraction)));
    row('Not measured', formatPercent(num(spec.unmeasured_fraction)));
  }
  if (verdict) row('Verdict', `${verdict.pass ? 'PASS' : 'FAIL'} by ${String(verdict.rule)}: ${String(verdict.reason)}`, verdict.pass ? 'pass' : 'fail');
  const scale = inspection.scale as Block;
  const px = num(scale?.pixel_size_um);
  const source = String(scale?.source ?? 'none');
  row('Scale', px === null ? 'none (no pixel size)' : `${formatFixed(px, 2)} µm per pixel (${source === 'pixel-size' ? 'from --pixel-size' : `from the part: ${formatFixed(num(scale.part_mm), 2)} mm over ${formatFixed(num(scale.part_px), 1)} px`})`);
  const edge = num(inspection.edge_exclusion_mm);
  row('Edge exclusion', edge === null ? 'none' : `${formatFixed(edge, 2)} mm (${formatFixed(num(inspection.edge_band_px), 1)} px) along the film area's outline`);
  row('Inspected area', `${String(inspection.inspected_px)} of ${String(inspection.film_area_px)} film pixels; ${formatPercent(num(inspection.coverage))} measured`);
  const stats = inspection.statistics as Block;
  row('Mean ± std', `${formatNm(num(stats.mean_nm))} ± ${formatNm(num(stats.std_nm))}`);
  row('Min – max', `${formatNm(num(stats.min_nm))} – ${formatNm(num(stats.max_nm))}`);
  const uniformity = inspection.uniformity as Block;
  const formulas = inspection.uniformity_formulas as Record<string, string>;
  const urows = Object.keys(formulas ?? {}).map((key) => {
    const v = num(uniformity?.[key]);
    return `<tr><th><code>${escapeHtml(formulas[key])}</code></th><td>${v === null ? '—' : `${formatFixed(v * 100, 2)} %`}</td></tr>`;
  });
  return `<section class="card" id="inspection"><h2>Inspection${verdict ? ` <span class="sub">${verdict.pass ? 'PASS' : 'FAIL'}</span>` : ''}</h2>
<div class="two-col"><div><table class="values">${rows.join('')}</table>${spec ? '<p class="note">Out-of-spec areas are outlined on the thickness map (dashed white and black line).</p>' : ''}</div>
<div><h3>Uniformity over the inspected area</h3><table class="values">${urows.join('')}</table>
<p class="note">Each figure is named by its formula (common practice): max, min, mean, median and the 5th/95th percentiles of the measured thickness; std is the sample standard deviation (1σ).</p></div></div></section>`;
}
