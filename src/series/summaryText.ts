/**
 * The few lines `lamella series` prints when done: counts, outputs, the rupture of the film when
 * it is gone from a frame on, and each drainage law's predicted threshold crossing with its ±1σ
 * interval and whether it is an extrapolation (none is predicted past the rupture).
 */
import type { SeriesResult } from './runSeries.js';
import { describeRupture, formatSeconds } from './rupture.js';

const sec = (v: number | null): string => (v === null ? '—' : `${v.toFixed(1)} s`);

export function formatSeriesSummary(result: SeriesResult): string[] {
  const count = (o: string) => result.events.filter((e) => e.outcome === o).length;
  const lines = [`series: ${count('mapped')} frame(s) mapped, ${count('skipped')} already done, ${result.failures.length} failed`];
  const summary = result.summary;
  if (summary === null) return lines;
  lines.push(`series: ${summary.frames.withResults}/${summary.frames.total} frames in ${result.outputs.join(', ')}`);
  const rupture = summary.rupture;
  if (rupture) lines.push(`series: ${describeRupture(rupture)}; drainage fits use the frames up to ${rupture.last_frame_with_film}`);
  for (const fit of summary.drainageFits) {
    const r2 = fit.rSquared === null ? '—' : fit.rSquared.toFixed(4);
    let text = `  ${fit.quantity} thickness, ${fit.model}: R² ${r2}, RMS ${fit.rmsNm.toFixed(1)} nm`;
    const c = fit.crossing;
    if (c) {
      text +=
        c.belowAtStart
          ? `; below ${c.thresholdNm} nm from the first frame`
          : c.beyondRupture && rupture
          ? `; the film ruptured (by ${formatSeconds(rupture.first_time_s)} s) before the curve reaches ${c.thresholdNm} nm: no crossing predicted`
          : c.timeS === null
          ? `; does not reach ${c.thresholdNm} nm`
          : `; reaches ${c.thresholdNm} nm at ${sec(c.timeS)} (±1σ ${sec(c.lowS)} … ${c.highS === null ? 'unbounded' : sec(c.highS)})${c.extrapolated ? ', extrapolated beyond the last frame' : ''}`;
    }
    lines.push(text);
  }
  return lines;
}
