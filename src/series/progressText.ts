/**
 * Text of the series progress display (the CLI writes it; the library only formats):
 * a bar for a terminal, a plain line for logs. Rate = frames handled per second of wall time;
 * time left = frames remaining / rate (a simple linear estimate, common practice).
 */
import type { SeriesProgress } from './types.js';

export function formatDuration(seconds: number): string {
  if (!Number.isFinite(seconds) || seconds < 0) return '--:--';
  const s = Math.round(seconds);
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const two = (v: number) => String(v).padStart(2, '0');
  return h > 0 ? `${h}:${two(m)}:${two(s % 60)}` : `${two(m)}:${two(s % 60)}`;
}

function rateAndLeft(p: SeriesProgress): { rate: number; leftS: number } {
  const elapsedS = p.elapsedMs / 1000;
  const rate = elapsedS > 0 ? p.done / elapsedS : 0;
  return { rate, leftS: rate > 0 ? (p.total - p.done) / rate : Number.NaN };
}

/** One terminal line: `[#####-----] 12/40 frames  1.8 frames/s  00:15 left  (2 skipped, 1 failed)`. */
export function formatProgressBar(p: SeriesProgress, width = 24): string {
  const fraction = p.total > 0 ? Math.min(1, p.done / p.total) : 1;
  const filled = Math.round(fraction * width);
  const { rate, leftS } = rateAndLeft(p);
  const extra = [p.skipped > 0 ? `${p.skipped} skipped` : '', p.failed > 0 ? `${p.failed} failed` : ''].filter(Boolean).join(', ');
  return `[${'#'.repeat(filled)}${'-'.repeat(width - filled)}] ${p.done}/${p.total} frames  ${rate.toFixed(1)} frames/s  ${formatDuration(leftS)} left${extra ? `  (${extra})` : ''}`;
}

/** A log line for non-terminal stderr: `series: 12/40 frames (30%), 1.8 frames/s, about 00:15 left`. */
export function formatProgressLine(p: SeriesProgress): string {
  const percent = p.total > 0 ? Math.floor((100 * p.done) / p.total) : 100;
  const { rate, leftS } = rateAndLeft(p);
  const extra = [p.skipped > 0 ? `${p.skipped} skipped` : '', p.failed > 0 ? `${p.failed} failed` : ''].filter(Boolean).join(', ');
  return `series: ${p.done}/${p.total} frames (${percent}%), ${rate.toFixed(1)} frames/s, about ${formatDuration(leftS)} left${extra ? `, ${extra}` : ''}`;
}
