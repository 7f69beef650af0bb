/**
 * `lamella series INPUT… --stack S --out OUT`: maps a photo series on worker threads with
 * resume and shards, then aggregates `series.csv`, `series.json` (drainage fits) and `report.html`.
 * Exit status 3 when any frame failed, 130/143 when interrupted by SIGINT/SIGTERM.
 */
import { abortOnSignals } from '../abortOnSignals.js';
import { CAMERA_HELP, parseCameraOption } from '../cameraOption.js';
import { LIGHT_FIELD_HELP, parseLightFieldOption } from '../lightFieldOption.js';
import { availableParallelism } from 'node:os';
import { Option, type Command } from 'commander';
import { InputError, UsageError, EXIT_FINDING, EXIT_INPUT } from '../errors.js';
import { addStackOptions, parseNumberOption, type StackCliOptions } from '../stackOptions.js';
import { addFilmAreaOptions, filmAreaFromOptions, parseExpect, type FilmAreaCliOptions } from '../filmAreaOptions.js';
import { parseShard } from '../../series/parseShard.js';
import { DEFAULT_CHUNK_FRAMES } from '../../series/runSeries.js';
import { runSeries, type RunSeriesOptions, type RunSeriesResult } from '../../api/runSeries.js';
import { formatFlowSummary } from './flow.js';
import { addInspectOptions, inspectFromOptions, type InspectCliOptions } from '../inspectOptions.js';
import { formatProgressBar, formatProgressLine } from '../../series/progressText.js';
import { formatSeriesSummary } from '../../series/summaryText.js';
import type { SeriesProgress } from '../../series/types.js';
import { addLightOptions, lightsFromOptions } from '../lightOptions.js';

export interface SeriesCliOptions extends StackCliOptions, FilmAreaCliOptions, InspectCliOptions {
  light: string;
  whiteBalance?: string;
  camera?: string;
  ignoreCalibrationMismatch?: boolean;
  lightField?: string;
  fps?: string;
  interval?: string;
  start?: string;
  end?: string;
  every?: string;
  range?: string;
  calibration?: string;
  workers: string;
  shard?: string;
  shardCount?: string;
  chunkFrames: string;
  aggregateOnly?: boolean;
  previews?: boolean;
  quiet?: boolean;
  report: boolean;
  out: string;
  allowDamaged?: boolean;
  flow?: boolean;
}

const YEAR_S = 31_536_000;

function positive(value: string | undefined, option: string, integer = false): number | null {
  if (value === undefined) return null;
  const n = parseNumberOption(value, option, integer ? 'a whole number >= 1' : 'a number > 0');
  if (n <= 0 || (integer && !Number.isInteger(n))) throw new UsageError(`${option} must be ${integer ? 'a whole number >= 1' : 'a number > 0'}, received ${value}`);
  return n;
}

function progressWriter(quiet: boolean): (p: SeriesProgress) => void {
  if (quiet) return () => undefined;
  const tty = process.stderr.isTTY === true;
  let last = 0;
  return (p) => {
    const now = Date.now();
    const final = p.done === p.total;
    if (!final && now - last < (tty ? 100 : 5000)) return;
    last = now;
    if (tty) process.stderr.write(`\r${formatProgressBar(p)}\x1b[K${final ? '\n' : ''}`);
    else process.stderr.write(`${formatProgressLine(p)}\n`);
  };
}

/** Checks the options and builds the library call (everything but callbacks and the signal). */
export async function seriesOptionsFrom(opts: SeriesCliOptions): Promise<RunSeriesOptions> {
  const fps = positive(opts.fps, '--fps');
  const intervalS = positive(opts.interval, '--interval');
  if (fps !== null && intervalS !== null) throw new UsageError('give --fps or --interval, not both');
  // Frame times must stay finite and meaningful: at most a year between frames, at most a
  // million frames a second.
  if (intervalS !== null && intervalS > YEAR_S) throw new UsageError(`--interval must be a number of seconds > 0 and at most ${YEAR_S} (a year), received ${opts.interval}`);
  if (fps !== null && !(fps >= 1 / YEAR_S && fps <= 1e6)) throw new UsageError(`--fps must be a number of frames per second from 1/${YEAR_S} (one a year) to 1e6, received ${opts.fps}`);
  const startS = opts.start === undefined ? null : parseNumberOption(opts.start, '--start', 'a time in seconds >= 0');
  const endS = opts.end === undefined ? null : parseNumberOption(opts.end, '--end', 'a time in seconds >= 0');
  if (startS !== null && startS < 0) throw new UsageError(`--start must be a time in seconds >= 0, received ${opts.start}`);
  if (endS !== null && endS < 0) throw new UsageError(`--end must be a time in seconds >= 0, received ${opts.end}`);
  if (startS !== null && endS !== null && startS > endS) throw new UsageError(`--start ${opts.start} is after --end ${opts.end}`);
  const every = positive(opts.every, '--every', true);
  const rangeNm = opts.range === undefined ? null : parseExpect(opts.range, Number.MAX_VALUE, '--range');
  // The same film-area options, defaults and limits as `lamella map`.
  const area = filmAreaFromOptions(opts);
  const { thinBelowNm, maxThicknessNm, region, anchors, pixelSizeUm, filmArea, expectNm } = area;
  const inspect = inspectFromOptions(opts);
  let shard = null;
  if (opts.shardCount !== undefined && opts.shard !== 'auto') throw new UsageError('--shard-count goes with --shard auto (a Kubernetes indexed Job)');
  if (opts.shard === 'auto') {
    shard = shardFromEnvironment(process.env, opts.shardCount === undefined ? null : positive(opts.shardCount, '--shard-count', true));
  } else if (opts.shard !== undefined) {
    try {
      shard = parseShard(opts.shard);
    } catch (error) {
      throw new UsageError(`--shard ${(error as Error).message.replace(/^shard /, '')}`);
    }
  }
  // Lights are checked here with the CLI's messages (the library checks them too).
  lightsFromOptions(opts);
  return {
    stack: opts.stack, filmIndex: opts.filmIndex, angle: opts.angle, extrapolate: opts.extrapolate,
    light: opts.light, whiteBalance: opts.whiteBalance ?? null,
    camera: parseCameraOption(opts.camera), lightField: parseLightFieldOption(opts.lightField),
    outDir: opts.out, fps, intervalS,
    select: startS !== null || endS !== null || every !== null ? { startS, endS, every } : null,
    rangeNm, thinBelowNm, maxThicknessNm, region, mask: area.maskPath, anchors, pixelSizeUm, filmArea, expectNm,
    calibration: opts.calibration ?? null, ignoreCalibrationMismatch: opts.ignoreCalibrationMismatch === true,
    workers: positive(opts.workers, '--workers', true)!, chunkFrames: positive(opts.chunkFrames, '--chunk-frames', true)!, shard,
    aggregateOnly: opts.aggregateOnly === true, previews: opts.previews === true, report: opts.report, allowDamaged: opts.allowDamaged === true,
    inspect,
    ...(opts.flow ? { flow: true } : {}),
  };
}

/**
 * `--shard auto`: this task's shard from the scheduler's environment. Slurm job arrays number
 * tasks SLURM_ARRAY_TASK_MIN, MIN + STEP, … (SLURM_ARRAY_TASK_COUNT of them); a Kubernetes indexed
 * Job numbers pods from 0 (JOB_COMPLETION_INDEX) and the count comes from --shard-count.
 */
export function shardFromEnvironment(env: NodeJS.ProcessEnv, shardCount: number | null): { index: number; count: number } {
  const whole = (name: string): number | null => {
    const v = env[name];
    return v !== undefined && /^\d+$/.test(v.trim()) ? Number(v) : null;
  };
  const id = whole('SLURM_ARRAY_TASK_ID');
  const count = whole('SLURM_ARRAY_TASK_COUNT');
  if (id !== null && count !== null && count >= 1) {
    const min = whole('SLURM_ARRAY_TASK_MIN') ?? 1;
    const step = whole('SLURM_ARRAY_TASK_STEP') ?? 1;
    const index = (id - min) / Math.max(step, 1) + 1;
    if (!Number.isInteger(index) || index < 1 || index > count) {
      throw new UsageError(`--shard auto: SLURM_ARRAY_TASK_ID ${id} does not fit the array (min ${min}, step ${step}, ${count} tasks)`);
    }
    return { index, count };
  }
  const k8s = whole('JOB_COMPLETION_INDEX');
  if (k8s !== null) {
    if (shardCount === null) throw new UsageError('--shard auto in a Kubernetes indexed Job needs --shard-count N (the Job\'s completions)');
    if (k8s >= shardCount) throw new UsageError(`--shard auto: JOB_COMPLETION_INDEX ${k8s} is not below --shard-count ${shardCount}`);
    return { index: k8s + 1, count: shardCount };
  }
  throw new UsageError('--shard auto needs a scheduler\'s task number: SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT (a Slurm job array) or JOB_COMPLETION_INDEX with --shard-count (a Kubernetes indexed Job); otherwise give --shard K/N');
}

/** The library's parameter names in a message as the options a user types. */
function optionNames(message: string): string {
  return message.replace(/\bfps or intervalS\b/g, '--fps or --interval').replace(/\bintervalS\b/g, '--interval');
}

/** Library errors about the inputs or frame times, as the CLI's error classes. */
function cliError(error: unknown, inputs: string[]): unknown {
  const prefix = `inputs ${inputs.join(' ')}: `;
  if (error instanceof RangeError && error.message.startsWith(prefix)) return new InputError(inputs.join(' '), error.message.slice(prefix.length));
  if (error instanceof RangeError && /^frame times:/.test(error.message)) return new UsageError(optionNames(error.message));
  return error;
}

async function run(inputs: string[], opts: SeriesCliOptions): Promise<void> {
  const warn = (m: string) => !opts.quiet && process.stderr.write(`lamella: warning: ${m}\n`);
  const options = await seriesOptionsFrom(opts);
  const interrupt = abortOnSignals();
  const progress = progressWriter(opts.quiet === true);
  let result: RunSeriesResult;
  try {
    result = await runSeries(inputs, options, {
      signal: interrupt.signal,
      onWarning: warn,
      onPlan: (plan) => {
        // On a re-run, say how many frames are mapped again and why.
        if (!opts.quiet && plan.stored > 0 && plan.remap.count > 0) {
          process.stderr.write(`lamella: ${plan.remap.count} of ${plan.frames} frame(s) to map: ${plan.remap.why}\n`);
        }
      },
      onProgress: (p, event) => {
        if (event.outcome === 'failed') process.stderr.write(`${process.stderr.isTTY && !opts.quiet ? '\n' : ''}lamella: ${event.message}\n`);
        progress(p);
      },
      onFlowProgress: (p) => {
        if (!opts.quiet) process.stderr.write(`flow: ${p.done}/${p.total} pair(s), ${p.pair} ${p.outcome === 'skipped' ? 'already done' : 'done'}\n`);
      },
    });
  } catch (error) {
    throw cliError(error, inputs);
  }
  // (The signal handlers stay until the process ends: see ../abortOnSignals.ts.)
  if (result.interrupted || interrupt.received() !== null) {
    process.stderr.write(`\nlamella: series interrupted by ${interrupt.received() ?? 'a signal'}; finished frames are kept, rerun the same command to resume\n`);
    process.exitCode = interrupt.exitStatus();
    return;
  }
  const failedNow = new Set(result.events.filter((e) => e.outcome === 'failed').map((e) => e.message));
  for (const w of result.warnings) warn(optionNames(w));
  for (const f of result.failures) if (!failedNow.has(f)) process.stderr.write(`lamella: ${f}\n`);
  if (!opts.quiet) process.stdout.write(`${formatSeriesSummary(result).join('\n')}\n`);
  if (!opts.quiet && result.flow) process.stdout.write(`${formatFlowSummary(result.flow).join('\n')}\n`);
  if (result.failures.length > 0) process.exitCode = EXIT_INPUT;
  else if (opts.failIfOutOfSpec && (result.summary?.inspection?.framesFailed ?? 0) > 0) process.exitCode = EXIT_FINDING;
}

export function register(program: Command): void {
  const command = program
    .command('series')
    .description('thickness maps of a photo series (worker threads, resumable, shardable), drainage fits and a report')
    .argument('<inputs...>', 'photos, folders of photos, or glob patterns (frames in natural order of their names); or one video file (MP4, MOV, AVI, MKV, … read with FFmpeg) or one multi-page TIFF stack');
  addLightOptions(addStackOptions(command), { required: false })
    .option('--camera <mode-or-file>', CAMERA_HELP)
    .option('--fps <n>', "frames per second, for frames without an EXIF capture time; for a video, overrides its own timestamps (e.g. a high-speed recording played back slower)")
    .option('--interval <s>', 'seconds between frames, for frames without an EXIF capture time (or instead of a video\'s timestamps)')
    .option('--start <s>', 'take frames from this time on (seconds from the first frame)')
    .option('--end <s>', 'take frames up to this time (seconds from the first frame)')
    .option('--every <n>', 'take every n-th of the frames in --start..--end (the first one first)')
    .option('--calibration <file>', 'photo-formation parameters from `lamella calibrate` instead of fitting them on every frame')
    .option('--light-field <mode>', LIGHT_FIELD_HELP, 'auto')
    .option('--ignore-calibration-mismatch', 'use a calibration made for another stack or light');
  addInspectOptions(addFilmAreaOptions(command, 'frames'), 'frames')
    .option('--workers <n>', 'worker threads', String(availableParallelism()))
    .option('--shard <K/N|auto>', 'map only the K-th of N contiguous parts of the series (1-based), then aggregate what OUT holds; auto = from the scheduler: a Slurm job array (SLURM_ARRAY_TASK_ID, _COUNT) or a Kubernetes indexed Job (JOB_COMPLETION_INDEX with --shard-count)')
    .option('--shard-count <n>', 'with --shard auto in a Kubernetes indexed Job: the number of shards (the Job\'s completions)')
    .option('--chunk-frames <n>', 'frames per chunk: each chunk starts without a prior map; keep equal across shards', String(DEFAULT_CHUNK_FRAMES))
    .option('--aggregate-only', 'map nothing; aggregate the per-frame results already in OUT (after shard runs)')
    .option('--previews', 'also write <frame>.map.png and <frame>.flags.png per frame (all maps in one colour range: the series\' own, or --range)')
    .option('--range <min-max>', 'colour range of the previews and the report\'s frame slider, nm (e.g. 0-1200); default the series\' own (lowest 5th to highest 95th percentile)')
    .option('--flow', 'also compute the film\'s flow (as `lamella flow OUT --out OUT/flow`) once the frames are mapped, and show it in the report')
    .option('--allow-damaged', 'map frames the decoder reports as damaged as far as they decode (a warning; the rest has no estimate)')
    .option('--quiet', 'no progress display, warnings or summary (failed frames are still reported)')
    .addOption(new Option('--no-report', 'do not write report.html'))
    .requiredOption('--out <dir>', 'output folder')
    .action((inputs: string[], opts: SeriesCliOptions) => run(inputs, opts));
}
