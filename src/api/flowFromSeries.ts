/**
 * `flowFromSeries`: the library's one call for what `lamella flow` does — velocity fields of a
 * film from a finished `lamella series` output folder. See ../flow/runFlow.ts for the outputs.
 */
import { runFlow, type FlowCallbacks, type FlowOptions, type FlowResult } from '../flow/runFlow.js';

export type { FlowOptions, FlowCallbacks, FlowResult, FlowProgress, FlowPairRecord } from '../flow/runFlow.js';
export type { FlowSummary } from '../flow/flowSummary.js';
export type { PatchRow } from '../flow/patches.js';

/**
 * Velocity fields between consecutive frames of a mapped series, from the thickness maps (not the
 * photos: colours repeat across interference orders, thicknesses do not), with thin patches
 * tracked over the frames.
 *
 * Per frame pair, in `options.outDir`: `<stem>.flow.npy` (float32 H × W × 2, vx then vy, px/s, or
 * µm/s with a pixel size; NaN where unknown or not confident), `<stem>.flow-confidence.npy`,
 * `<stem>.flow.png` (arrows over the thickness map) and `<stem>.flow.json`; for the whole series
 * `flow.csv` (per pair: mean and 95th-percentile speed, mean velocity, divergence, vorticity,
 * thinning rate, coverage), `patches.csv` (thin patches: area and rise velocity against time) and
 * `flow.json`. A rerun skips pairs already done with the same settings and frames.
 *
 * @param seriesDir a folder written by `lamella series` / `runSeries` (holds `series.json`).
 * @param options output folder and settings; pixel size and thin threshold default to the series'.
 * @param callbacks `onProgress` after each pair; `signal` stops between pairs (finished pairs are kept).
 * @throws InputError naming the folder or file when it is not a series output, has fewer than two
 *   mapped frames, or holds frames of different sizes; RangeError for an option out of range.
 * @example
 * ```ts
 * const flow = await flowFromSeries('out/series', { outDir: 'out/series/flow', pixelSizeUm: 12.5 });
 * for (const pair of flow.pairs) console.log(pair.timeS, pair.summary.meanSpeedPerS);
 * ```
 */
export function flowFromSeries(seriesDir: string, options: FlowOptions, callbacks: FlowCallbacks = {}): Promise<FlowResult> {
  return runFlow(seriesDir, options, callbacks);
}
