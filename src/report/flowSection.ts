/**
 * The flow view of a series report (when `lamella flow` wrote OUT/flow): speed against time (mean
 * and 95th percentile over the confident vectors of each frame pair, and the mean upward
 * velocity), and a note on what the arrows in the frame slider show.
 */
import { escapeHtml } from './escapeHtml.js';
import { formatFixed } from './formatNumber.js';
import { niceDomain } from './niceTicks.js';
import { renderLineChart } from './svgChart.js';
import type { SeriesFlowView } from './types.js';

export function renderFlowSection(flow: SeriesFlowView): string {
  const unit = escapeHtml(flow.unit);
  if (flow.pairs.length === 0) return `<section class="card" id="flow"><h2>Flow</h2><p class="muted">No frame pair has a flow yet.</p></section>`;
  // Each pair's velocity belongs to the middle of its interval.
  const mid = (p: SeriesFlowView['pairs'][number]) => p.timeS + p.dtS / 2;
  const values = flow.pairs.flatMap((p) => [p.meanSpeed, p.p95Speed, p.meanUp]).filter((v): v is number => v !== null && Number.isFinite(v));
  const times = flow.pairs.map(mid);
  const chart = renderLineChart({
    title: 'Speed against time', xLabel: 'Time (s)', yLabel: `Speed (${flow.unit})`, id: 'flow-chart', widthPx: 1160, heightPx: 300,
    xDomain: niceDomain(Math.min(0, ...times), Math.max(...times), 6),
    yDomain: values.length > 0 ? niceDomain(Math.min(0, ...values), Math.max(...values), 5) : undefined,
    horizontalLines: [{ value: 0, label: 'zero', colour: '#888' }],
    series: [
      { label: 'mean speed', colour: '#0e6b70', style: 'both', points: flow.pairs.map((p) => [mid(p), p.meanSpeed]) },
      { label: '95th percentile speed', colour: '#2f6fb0', style: 'line', dashed: true, points: flow.pairs.map((p) => [mid(p), p.p95Speed]) },
      { label: 'mean upward velocity', colour: '#d35400', style: 'both', points: flow.pairs.map((p) => [mid(p), p.meanUp]) },
    ],
  });
  const coverage = flow.pairs.map((p) => p.coverage);
  const meanCoverage = coverage.reduce((a, b) => a + b, 0) / coverage.length;
  return `<section class="card" id="flow"><h2>Flow <span class="sub">${flow.pairs.length} frame pair(s), ${unit}; ${flow.patches} thin patch(es) tracked (flow/patches.csv)</span></h2>`
    + chart
    + `<p class="note">Velocities from the thickness maps of consecutive frames (flow/flow.csv), over the vectors the method is confident of: on average ${formatFixed(meanCoverage * 100, 0)} % of the film. `
    + 'Featureless film (no thickness texture to follow) has no vector. In the frame slider above, a frame with a flow shows arrows of its motion to the next frame over its thickness map. '
    + 'Plotted at the middle of each pair\'s interval; up is against gravity in the photo.</p></section>';
}
