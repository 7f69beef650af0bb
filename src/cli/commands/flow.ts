/**
 * `lamella flow SERIES_OUT --out DIR`: velocity fields between consecutive frames of a finished
 * series (from its thickness maps), thin patches tracked over the frames; resumable and shardable.
 * A thin layer over `flowFromSeries` (../../api/flowFromSeries.ts).
 */
import { abortOnSignals } from '../abortOnSignals.js';
import type { Command } from 'commander';
import { flowFromSeries } from '../../api/flowFromSeries.js';
import type { FlowOptions, FlowResult } from '../../flow/runFlow.js';
import { parseShard } from '../../series/parseShard.js';
import { EXIT_INPUT, UsageError } from '../errors.js';
import { parseNumberOption } from '../stackOptions.js';

export interface FlowCliOptions {
  out: string;
  pixelSize?: string;
  thinBelow?: string;
  minConfidence: string;
  window: string;
  overlays: boolean;
  shard?: string;
  aggregateOnly?: boolean;
  quiet?: boolean;
}

/** Checks the options and builds the library call. */
export function flowOptionsFrom(opts: FlowCliOptions): FlowOptions {
  let pixelSizeUm: number | undefined;
  if (opts.pixelSize !== undefined) {
    pixelSizeUm = parseNumberOption(opts.pixelSize, '--pixel-size', 'a number of micrometres > 0');
    if (!(pixelSizeUm > 0 && pixelSizeUm <= 1e6)) throw new UsageError(`--pixel-size must be a number of micrometres > 0 and at most 1e6 (1 m), received ${opts.pixelSize}`);
  }
  let thinBelowNm: number | undefined;
  if (opts.thinBelow !== undefined) {
    thinBelowNm = parseNumberOption(opts.thinBelow, '--thin-below', 'a thickness in nm > 0');
    if (!(thinBelowNm > 0 && thinBelowNm <= 1e6)) throw new UsageError(`--thin-below must be a thickness in nm > 0, received ${opts.thinBelow}`);
  }
  const minConfidence = parseNumberOption(opts.minConfidence, '--min-confidence', 'a number from 0 to below 1');
  if (!(minConfidence >= 0 && minConfidence < 1)) throw new UsageError(`--min-confidence must be a number from 0 to below 1, received ${opts.minConfidence}`);
  const windowSigmaPx = parseNumberOption(opts.window, '--window', 'a number of pixels from 1 to 32');
  if (!(windowSigmaPx >= 1 && windowSigmaPx <= 32)) throw new UsageError(`--window must be a number of pixels from 1 to 32, received ${opts.window}`);
  let shard = null;
  if (opts.shard !== undefined) {
    try {
      shard = parseShard(opts.shard);
    } catch (error) {
      throw new UsageError(`--shard ${(error as Error).message.replace(/^shard /, '')}`);
    }
  }
  if (shard && opts.aggregateOnly) throw new UsageError('give --shard or --aggregate-only, not both');
  return {
    outDir: opts.out, minConfidence, windowSigmaPx, overlays: opts.overlays, shard, aggregateOnly: opts.aggregateOnly === true,
    ...(pixelSizeUm !== undefined ? { pixelSizeUm } : {}), ...(thinBelowNm !== undefined ? { thinBelowNm } : {}),
  };
}

/** The lines `lamella flow` prints when it is done. */
export function formatFlowSummary(result: FlowResult): string[] {
  const lines = [`flow: ${result.computed} frame pair(s) computed, ${result.skipped} already done; ${result.pairs.length} pair(s) in ${result.outputs.join(', ')}`];
  const speeds = result.pairs.map((p) => p.summary.meanSpeedPerS).filter((v): v is number => v !== null);
  if (speeds.length > 0) {
    const mean = speeds.reduce((a, b) => a + b, 0) / speeds.length;
    const coverages = result.pairs.map((p) => p.summary.coverage).sort((a, b) => a - b);
    const coverage = coverages[Math.floor(coverages.length / 2)];
    lines.push(`flow: mean speed ${mean.toPrecision(3)} ${result.unit} over ${speeds.length} pair(s) (min ${Math.min(...speeds).toPrecision(3)}, max ${Math.max(...speeds).toPrecision(3)}); known on ${(100 * coverage).toFixed(1)} % of the film (median)`);
  }
  const patches = new Set(result.patches.map((p) => p.patch)).size;
  lines.push(`flow: ${patches} thin patch(es) tracked`);
  return lines;
}

async function run(seriesDir: string, opts: FlowCliOptions): Promise<void> {
  const options = flowOptionsFrom(opts);
  const interrupt = abortOnSignals();
  const result = await flowFromSeries(seriesDir, options, {
    signal: interrupt.signal,
    onProgress: (p) => {
      if (!opts.quiet) process.stderr.write(`flow: ${p.done}/${p.total} pair(s), ${p.pair} ${p.outcome === 'skipped' ? 'already done' : 'done'}\n`);
    },
  });
  if (result.interrupted || interrupt.received() !== null) {
    process.stderr.write(`lamella: flow interrupted by ${interrupt.received() ?? 'a signal'}; finished pairs are kept, rerun the same command to resume\n`);
    process.exitCode = interrupt.exitStatus();
    return;
  }
  if (!opts.quiet) {
    for (const w of result.warnings) process.stderr.write(`lamella: warning: ${w}\n`);
    process.stdout.write(`${formatFlowSummary(result).join('\n')}\n`);
  }
  if (result.missingPairs.length > 0 && !options.shard && !options.aggregateOnly) process.exitCode = EXIT_INPUT;
}

export function register(program: Command): void {
  program
    .command('flow')
    .description('velocity fields between consecutive frames of a finished series, from its thickness maps; thin patches tracked (resumable, shardable)')
    .argument('<series-out>', 'a folder written by `lamella series` (holds series.json)')
    .requiredOption('--out <dir>', 'output folder (e.g. SERIES_OUT/flow, which the series report shows)')
    .option('--pixel-size <um>', 'size of one pixel on the film, micrometres: velocities in µm/s (default: the series\' own, else px/s)')
    .option('--thin-below <nm>', 'thin patches are regions below this thickness, nm (default: the series\' own)')
    .option('--min-confidence <c>', 'vectors less confident than this (0..1) are NaN in <frame>.flow.npy and left out of the summaries', '0.5')
    .option('--window <px>', 'σ of the flow\'s Gaussian window, pixels (larger: smoother, fewer unknowns)', '4')
    .option('--no-overlays', 'do not write the <frame>.flow.png arrow overlays')
    .option('--shard <K/N>', 'compute only the K-th of N contiguous parts of the frame pairs, then aggregate what OUT holds')
    .option('--aggregate-only', 'compute nothing; aggregate the pairs already in OUT (after shard runs)')
    .option('--quiet', 'no progress, warnings or summary')
    .action((seriesDir: string, opts: FlowCliOptions) => run(seriesDir, opts));
}
