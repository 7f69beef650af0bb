/**
 * The few lines `lamella series` prints when done: counts, outputs, what the frames observed (the
 * first thin region, the recent thinning rate), the rupture of the film when it is gone from a
 * frame on, a threshold crossing only where the laws agree (./observations.ts), and each drainage law's predicted threshold crossing with its ±1σ
 * interval and whether it is an extrapolation (none is predicted past the rupture).
 */
import type { SeriesResult } from './runSeries.js';
import { describeRupture, formatSeconds } from './rupture.js';
import type { SeriesObservations } from './observations.js';

const sec = (v: number | null): string => (v === null ? '—' : `${v.toFixed(1)} s`);

function observationLines(o: SeriesObservations): string[] {
  const lines: string[] = [];
  lines.push(o.first_thin ? `series: first thin region at ${sec(o.first_thin.time_s)} (frame ${o.first_thin.frame})` : 'series: no thin region in any frame');
  const r = o.recent_thinning;
  if (r) {
    const se = r.standard_error_nm_per_s === null ? '' : ` ± ${r.standard_error_nm_per_s.toFixed(2)}`;
    lines.push(`series: mean thickness ${r.rate_nm_per_s <= 0 ? 'thinning' : 'growing'} at ${Math.abs(r.rate_nm_per_s).toFixed(2)}${se} nm/s over the last ${r.frames} frames (${sec(r.from_s)}–${sec(r.to_s)})`);
  }
  return lines;
}

function predictionLines(o: SeriesObservations): string[] {
  return o.predictions.map((p) => {
    const what = `${p.quantity} thickness reaches ${p.threshold_nm} nm`;
    if (p.time_s === null) return `series: ${what}: no reliable prediction — ${p.reason}`;
    if (p.reason) return `series: ${what} at ${sec(p.time_s)} (${p.reason})`;
    return `series: ${what} at about ${sec(p.time_s)} (the laws agree: ${sec(p.range_s![0])}–${sec(p.range_s![1])}${p.extrapolated ? ', extrapolated beyond the last frame' : ''})`;
  });
}

/**
 * The count line: every frame of the series is exactly one of mapped now, already done (a current
 * result from an earlier run or another shard), failed now, or without a result (e.g. another
 * shard's, not yet mapped); frames of the inputs that are not in the series are counted apart.
 */
export function countLine(result: SeriesResult): string {
  const count = (o: string) => result.events.filter((e) => e.outcome === o).length;
  const mapped = count('mapped');
  const failed = count('failed');
  const summary = result.summary;
  if (summary === null) return `series: ${mapped} frame(s) mapped, ${count('skipped')} already done, ${failed} failed`;
  const f = summary.frames;
  const done = Math.max(0, f.withResults - mapped);
  const without = Math.max(0, f.total - mapped - done - failed);
  let line = `series: ${mapped} frame(s) mapped, ${done} already done, ${failed} failed${without > 0 ? `, ${without} without a result` : ''} (${f.total} in the series`;
  const apart: string[] = [];
  if (f.unreadable > 0) apart.push(`${f.unreadable} unreadable or of another size`);
  if (f.outsideSelection > 0) apart.push(`${f.outsideSelection} outside --start/--end/--every`);
  line += apart.length > 0 ? `; ${f.inputs} in the inputs: ${apart.join(', ')})` : ')';
  return line;
}

export function formatSeriesSummary(result: SeriesResult): string[] {
  const lines = [countLine(result)];
  const summary = result.summary;
  if (summary === null) return lines;
  lines.push(`series: ${summary.frames.withResults}/${summary.frames.total} frames in ${result.outputs.join(', ')}`);
  const judged = summary.inspection;
  if (judged) {
    const spec = (summary.settings.inspect as { spec?: string; passIf?: string } | undefined) ?? {};
    lines.push(`series: spec ${spec.spec ?? ''}: ${judged.framesPassed} of ${judged.framesJudged} frame(s) pass${spec.passIf ? ` (${spec.passIf})` : ''}${judged.framesFailed > 0 ? `, ${judged.framesFailed} fail` : ''}`);
  }
  const rupture = summary.rupture;
  // Observations first, then predictions, then each law's own numbers.
  lines.push(...observationLines(summary.observations));
  if (rupture) lines.push(`series: ${describeRupture(rupture)}; drainage fits use the frames up to ${rupture.last_frame_with_film}`);
  lines.push(...predictionLines(summary.observations));
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
