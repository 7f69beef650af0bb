/**
 * A photo series from inputs to outputs: expand and order the frames, read their headers and
 * times, map this run's share of chunks (all of them, or one shard) with resume, then aggregate
 * every per-frame result present in OUT into `series.csv` and `series.json` (with drainage fits).
 * Writes files, never prints; progress and problems come back through callbacks and the result.
 */
import { mkdir } from 'node:fs/promises';
import { basename, join, resolve, sep } from 'node:path';
import { atomicWriteFile } from '../io/atomicWriteFile.js';
import { expandInputs, type ExpandedInputs } from './expandInputs.js';
import { ensureOutputDir } from '../io/ensureOutputDir.js';
import { probeFrames, type ProbedFrames, type ReadFrameHeader } from './probeFrames.js';
import { containerFingerprint, containerFrameSource, type ContainerInput } from './containerFrames.js';
import { UsageError } from '../errors.js';
import { assignFrameTimes } from './frameTimes.js';
import { chunkFrames, shardChunks } from './chunkFrames.js';
import type { Shard } from './parseShard.js';
import { settingsHash } from './settingsHash.js';
import { framesDir, isFrameDone, readFrameRecord, removePartialFrames } from './frameFiles.js';
import { describeRemapReasons, fingerprintFrame, fingerprintInputFiles, frameSettingsHash, remapReason, type RemapReason } from './frameSource.js';
import { assertNoInputOverwritten } from '../io/ensureOutputDir.js';
import { recoverStagedSets, writeOutputSet } from '../io/writeOutputSet.js';
import { runFrames } from './runFrames.js';
import { collectSeriesRows } from './seriesRows.js';
import { formatSeriesCsv } from './seriesCsv.js';
import { fitSeriesDrainage } from './fits/fitSeriesDrainage.js';
import { findRupture, rowHasFilm } from './rupture.js';
import { renderSeriesReport } from '../report/renderSeriesReport.js';
import { seriesReportInput } from './seriesReportInput.js';
import { lastFrameView, processorOf } from './lastFrameView.js';
import { redrawPreviews, seriesRangeOf } from './seriesPreviews.js';
import type { MapReportInput } from '../report/types.js';
import { seriesSummary, seriesSummaryJson, type SeriesSummary } from './seriesSummary.js';
import type { FrameEvent, FrameJob, FrameProcessor, ProcessorSource, SeriesProgress } from './types.js';

export const DEFAULT_CHUNK_FRAMES = 10;
/** The aggregate outputs in OUT, replaced as one set. */
export const AGGREGATE_OUTPUTS = ['series.csv', 'series.json', 'report.html'] as const;
/** Per-frame outputs in OUT/frames (./frameFiles.ts). */
const FRAME_SUFFIXES = ['.json', '.thickness.npy', '.status.npy', '.confidence.npy', '.map.png', '.flags.png'];

export interface SeriesOptions {
  readonly inputs: readonly string[];
  readonly outDir: string;
  readonly fps?: number | null;
  readonly intervalS?: number | null;
  /** `--range`: the previews' colour range [min, max] nm; default the series' own (./seriesPreviews.ts). */
  readonly rangeNm?: readonly [number, number] | null;
  /** Frames to take: times from `startS` to `endS` (seconds, inclusive), then every `every`-th of them. */
  readonly select?: { readonly startS?: number | null; readonly endS?: number | null; readonly every?: number | null } | null;
  readonly thinBelowNm: number | null;
  /** Frames per chunk (prior chains restart at each chunk); default DEFAULT_CHUNK_FRAMES. */
  readonly chunkFrames?: number;
  /** Worker threads; 0 maps in this thread (needs a FrameProcessor object). */
  readonly workers: number;
  readonly shard?: Shard | null;
  /** Map nothing; only aggregate the per-frame results already in OUT. */
  readonly aggregateOnly?: boolean;
  readonly previews?: boolean;
  /** Everything that shapes a frame's map, JSON-serialisable; hashed into each frame record. */
  readonly mapSettings: Record<string, unknown>;
  readonly calibration?: Record<string, unknown> | null;
  readonly processor: ProcessorSource | FrameProcessor;
  readonly readHeader?: ReadFrameHeader;
  readonly cwd?: string;
  readonly signal?: AbortSignal;
  readonly onFrame?: (event: FrameEvent, progress: SeriesProgress) => void;
  /** Called once the frames to map are known (for progress display). */
  /** Write `report.html` (default true). */
  readonly report?: boolean;
  readonly reportTitle?: string;
  /** Map the last frame once more for the report's full map view (default true). */
  readonly reportLastMap?: boolean;
  /** ISO time printed in the report (default: now). */
  readonly generatedAt?: string;
  /**
   * Called once with the series' frame size (the size most frames share) before any frame is
   * mapped, e.g. to check a region or anchors against it; an error it throws stops the run.
   */
  readonly checkFrameSize?: (size: { readonly width: number; readonly height: number }) => void | Promise<void>;
  readonly onPlan?: (plan: SeriesPlan) => void;
  /**
   * The data files the frames' results depend on (stack and material files, calibration, mask,
   * light SPD): their contents are part of the settings hash, and no output may be one of them.
   */
  readonly inputFiles?: readonly { readonly path: string; readonly role: string }[];
}

export interface SeriesPlan {
  readonly frames: number;
  readonly toVisit: number;
  readonly chunks: number;
  readonly workers: number;
  /** Frames of this run's share that have a stored result, current or not. */
  readonly stored: number;
  /** How many frames this run maps (again), and why, e.g. "3 photo file changed, 1 not mapped before". */
  readonly remap: { readonly count: number; readonly why: string };
}

export interface SeriesResult {
  readonly interrupted: boolean;
  readonly summary: SeriesSummary | null;
  /** Per-frame failures of this run and frames rejected before mapping (one line each). */
  readonly failures: string[];
  readonly warnings: string[];
  readonly events: FrameEvent[];
  readonly outputs: string[];
}

export async function runSeries(options: SeriesOptions): Promise<SeriesResult> {
  const outDir = resolve(options.cwd ?? process.cwd(), options.outDir);
  const chunkSize = options.chunkFrames ?? DEFAULT_CHUNK_FRAMES;
  const expanded = await excludeOwnOutputs(await expandInputs(options.inputs, options.cwd), outDir);
  if (expanded.frames.length === 0) {
    const list = options.inputs.join(' ') || '(none given)';
    throw new RangeError(`inputs ${list}: no image frames found${expanded.warnings.length ? ` (${expanded.warnings.join('; ')})` : ''}`);
  }
  const warnings = [...expanded.warnings];
  const container = expanded.container ?? null;
  const probed = container ? containerProbe(expanded.frames, container) : await probeFrames(expanded.frames, options.readHeader);
  const failures = [...probed.messages];
  if (container?.damage) {
    failures.push(`${basename(container.path)}: the video is truncated or damaged (FFmpeg: ${container.damage}); the ${container.frameCount} frame(s) before the damage are mapped`);
  }
  if (probed.readable.length === 0) throw new RangeError(`inputs ${options.inputs.join(' ')}: none of the ${expanded.frames.length} frames could be read (${failures[0]})`);
  const fromFile = container !== null && container.timesS !== null && options.fps == null && options.intervalS == null;
  if (container !== null && container.timesS === null && options.fps == null && options.intervalS == null) {
    throw new UsageError(`${basename(container.path)} is an image stack without frame times: give --fps or --interval`);
  }
  const timing = fromFile
    ? { timesS: container!.timesS!, source: 'video' as const, warnings: [] as string[] }
    : assignFrameTimes(
        probed.readable.map(({ frame, header }) => ({ name: frame.name, exifTimeMs: header.exifTimeMs, exifProblem: header.exifProblem ?? null })),
        options.fps ?? null,
        options.intervalS ?? null,
      );
  warnings.push(...timing.warnings);
  // Timed by a frame rate, a frame keeps its place in the input list: an unreadable frame leaves
  // its gap in time instead of shifting every later frame one step earlier.
  const stepS = timing.source === 'fps' ? (options.fps ? 1 / options.fps : (options.intervalS ?? null)) : null;
  const timed = selectFrames(
    probed.readable
      .map(({ frame }, i) => ({ frame, timeS: stepS !== null ? frame.index * stepS : timing.timesS[i] }))
      .filter(({ frame }) => !probed.wrongSize.has(frame.index)),
    options.select ?? null,
  );
  if (timed.length === 0) throw new UsageError(`--start/--end/--every leave no frame of the ${probed.readable.length}`);
  // Each frame's own file, by content: a replaced photo is mapped again.
  const containerFile = container ? await containerFingerprint(container.path) : null;
  for (const t of timed) {
    const source = t.frame.container ? (containerFile ? containerFrameSource(containerFile, t.frame.container.index) : null) : await fingerprintFrame(t.frame.path);
    if (source) t.frame = { ...t.frame, source };
  }
  const frames = timed.map((t) => t.frame);
  const dataFiles = options.inputFiles ?? [];
  // No output may be a frame or a data file of the run, however the folder is reached.
  assertNoInputOverwritten(
    [...frames.map((f) => ({ path: f.path, role: 'frame' })), ...dataFiles],
    [...AGGREGATE_OUTPUTS.map((n) => join(outDir, n)), ...frames.flatMap((f) => FRAME_SUFFIXES.map((s) => join(framesDir(outDir), f.stem + s)))],
  );
  if (probed.size && options.checkFrameSize) await options.checkFrameSize(probed.size);
  const inputFiles = await fingerprintInputFiles(dataFiles);
  const hash = settingsHash({ format: 1, chunkFrames: chunkSize, map: options.mapSettings, calibration: options.calibration ?? null, ...(dataFiles.length > 0 ? { inputFiles } : {}) });
  await ensureOutputDir(outDir);
  await mkdir(framesDir(outDir), { recursive: true });
  // What a run killed outright left of the aggregate outputs: finish or drop it.
  recoverStagedSets(outDir);
  const chunks = chunkFrames(frames, chunkSize);
  if (options.shard && options.shard.count > chunks.length && !options.aggregateOnly) {
    // More shards than chunks would leave some shards with nothing to map: say so in every shard.
    throw new UsageError(
      `--shard ${options.shard.index}/${options.shard.count}: the series has only ${chunks.length} chunk(s) of up to ${chunkSize} frames; use at most ${chunks.length} shards, or a smaller --chunk-frames (the same in every shard)`,
    );
  }
  const mine = options.shard ? shardChunks(chunks, options.shard) : chunks;
  const toVisit = options.aggregateOnly ? [] : mine;
  await removePartialFrames(outDir, new Set(toVisit.flat().map((f) => f.stem)));
  const visitCount = toVisit.reduce((n, c) => n + c.length, 0);
  const workers = Math.min(options.workers, toVisit.length);
  const reasons: RemapReason[] = [];
  let stored = 0;
  for (const chunk of toVisit) {
    // Walk each chunk's prior chain as runChunk will (a failing frame aside).
    let priorHash: string | null = null;
    for (const frame of chunk) {
      const record = await readFrameRecord(outDir, frame.stem);
      if (record !== null) stored++;
      const expected = frameSettingsHash(hash, frame, priorHash);
      let reason = remapReason(record, frame, expected, { seriesHash: hash, inputFiles });
      if (reason === null && !(await isFrameDone(outDir, frame.stem, expected, options.previews ?? false))) reason = 'incomplete';
      if (reason !== null) reasons.push(reason);
      priorHash = expected;
    }
  }
  options.onPlan?.({ frames: frames.length, toVisit: visitCount, chunks: toVisit.length, workers, stored, remap: { count: reasons.length, why: describeRemapReasons(reasons) } });
  const run = toVisit.length === 0 ? { events: [], interrupted: false } : await runFrames({
    chunks: toVisit,
    outDir,
    settingsHash: hash,
    ...(dataFiles.length > 0 ? { inputFiles } : {}),
    previews: options.previews ?? false,
    expectedSize: probed.size,
    workers: options.workers === 0 ? 0 : workers,
    processor: options.processor,
    signal: options.signal,
    onFrame: options.onFrame,
  });
  for (const event of run.events) if (event.outcome === 'failed') failures.push(event.message ?? `${event.name}: failed`);
  if (run.interrupted) return { interrupted: true, summary: null, failures, warnings, events: run.events, outputs: [] };
  const aborted = (): boolean => options.signal?.aborted === true;
  const interrupted: SeriesResult = { interrupted: true, summary: null, failures, warnings, events: run.events, outputs: [] };
  if (aborted()) return interrupted;
  const collected = await collectSeriesRows(outDir, frames, timed.map((t) => t.timeS), hash);
  if (options.aggregateOnly && collected.missing.length > 0) {
    // After shard runs: frames without a current result (failed, or their shard did not finish) make the aggregate incomplete.
    const names = collected.missing.length <= 10 ? collected.missing.join(', ') : `${collected.missing.slice(0, 10).join(', ')} and ${collected.missing.length - 10} more`;
    failures.push(`${collected.missing.length} of ${frames.length} frame(s) have no current result: ${names}; rerun the shards that map them (the same command with their --shard), or this command without --aggregate-only to map them here`);
  }
  if (collected.stale.length > 0) warnings.push(`${collected.stale.length} frame(s) have results from other settings or another photo file (e.g. ${collected.stale[0]}); they are left out until mapped again`);
  // Previews in one colour range for the whole series (given, or the series' own).
  let previewRangeNm: readonly [number, number] | null = null;
  if (options.previews && collected.rows.length > 0) {
    const current = frames.filter((f) => collected.rows.some((r) => r.frame === f.name));
    const records = (await Promise.all(current.map((f) => readFrameRecord(outDir, f.stem)))).filter((r): r is NonNullable<typeof r> => r !== null);
    previewRangeNm = options.rangeNm ?? seriesRangeOf(records);
    if (previewRangeNm) await redrawPreviews(outDir, current, previewRangeNm, await processorOf(options.processor), aborted);
    if (aborted()) return interrupted;
  }
  // Rupture and fits from the aggregated rows only, so shards + aggregation give a single run's record.
  const film = findRupture(collected.rows);
  warnings.push(...film.warnings);
  const drainage = fitSeriesDrainage(collected.rows, options.thinBelowNm, film);
  warnings.push(...drainage.warnings);
  const summary = seriesSummary({
    settings: {
      ...options.mapSettings, thinBelowNm: options.thinBelowNm, chunkFrames: chunkSize, timeSource: timing.source, settingsHash: hash,
      ...(previewRangeNm ? { previewRangeNm: [...previewRangeNm], previewRangeSource: options.rangeNm ? '--range' : 'the series (lowest 5th to highest 95th percentile)' } : {}),
    },
    calibration: options.calibration ?? null,
    frames: frames.length,
    inputCounts: {
      inputs: expanded.frames.length,
      unreadable: expanded.frames.length - probed.readable.length + probed.wrongSize.size,
      outsideSelection: probed.readable.length - probed.wrongSize.size - frames.length,
    },
    rows: collected.rows,
    missing: collected.missing,
    fits: drainage.fits,
    rupture: film.rupture,
    size: probed.size,
    warnings: [...warnings, ...failures],
    inputFiles,
  });
  const [csvPath, jsonPath, reportPath] = AGGREGATE_OUTPUTS.map((name) => join(outDir, name));
  const outputs = [csvPath, jsonPath];
  // series.csv, series.json and report.html replace the old ones all together or not at all: a
  // signal before the swap leaves the old three (and the run exits as interrupted).
  try {
    await writeOutputSet([csvPath, jsonPath, reportPath], async (staging) => {
      await writeAtomic(join(staging, AGGREGATE_OUTPUTS[0]), formatSeriesCsv(collected.rows));
      await writeAtomic(join(staging, AGGREGATE_OUTPUTS[1]), `${JSON.stringify(seriesSummaryJson(summary), null, 2)}\n`);
      if (options.report !== false) {
        const input = await seriesReportInput(summary, collected.rows, {
          title: options.reportTitle ?? `Series of ${frames.length} frames`,
          generatedAt: options.generatedAt ?? new Date().toISOString(),
          outDir,
          stems: new Map(frames.map((f) => [f.name, f.stem])),
        });
        // The map view shows the last frame with film (after a rupture the last frames hold none).
        const lastRow = [...collected.rows].reverse().find(rowHasFilm) ?? collected.rows[collected.rows.length - 1];
        const last = lastRow ? frames.find((f) => f.name === lastRow.frame) : undefined;
        let lastMap: MapReportInput | null = null;
        if (last && options.reportLastMap !== false && !aborted()) {
          try {
            lastMap = await lastFrameView(outDir, last, frames, options.processor);
          } catch (error) {
            warnings.push(`report: the map view of the last frame ${last.name} was left out (${error instanceof Error ? error.message : String(error)})`);
          }
        }
        await writeAtomic(join(staging, AGGREGATE_OUTPUTS[2]), renderSeriesReport(lastMap ? { ...input, lastMap: { ...lastMap, calibration: options.calibration ?? null } } : input));
        outputs.push(reportPath);
      }
      // The last look before the swap (which runs in the same turn of the event loop).
      if (aborted()) throw new Error('interrupted');
    });
  } catch (error) {
    // The interrupt clean-up may have removed the staging folder under a write: not a write error.
    if (aborted()) return interrupted;
    throw error;
  }
  // A signal that came after the swap: the new set is whole; the run still reports the signal.
  if (aborted()) return { ...interrupted, summary, outputs };
  return { interrupted: false, summary, failures, warnings, events: run.events, outputs };
}

/** A container's frames all readable at the container's size (a frame that differs fails when decoded). */
function containerProbe(frames: readonly FrameJob[], container: ContainerInput): ProbedFrames {
  return {
    readable: frames.map((frame) => ({ frame, header: { width: container.width, height: container.height, exifTimeMs: null } })),
    size: { width: container.width, height: container.height },
    wrongSize: new Set(),
    messages: [],
  };
}

/** Frames within [startS, endS], then every n-th of those (the first kept). */
function selectFrames<T extends { timeS: number }>(frames: T[], select: SeriesOptions['select']): T[] {
  if (!select) return frames;
  const tolerance = 1e-9;
  const inRange = frames.filter((f) => (select.startS == null || f.timeS >= select.startS - tolerance) && (select.endS == null || f.timeS <= select.endS + tolerance));
  const every = select.every ?? 1;
  return every > 1 ? inRange.filter((_, i) => i % every === 0) : inRange;
}

/** Drops inputs inside OUT/frames (previews of an earlier run picked up by a broad glob). */
async function excludeOwnOutputs(expanded: ExpandedInputs, outDir: string): Promise<ExpandedInputs> {
  const inside = framesDir(outDir) + sep;
  const kept = expanded.frames.filter((f) => !f.path.startsWith(inside));
  if (kept.length === expanded.frames.length) return expanded;
  const warnings = [...expanded.warnings, `${expanded.frames.length - kept.length} input file(s) inside the output folder's frames/ were left out`];
  return { frames: kept.map((f, index) => ({ ...f, index })), warnings };
}

async function writeAtomic(path: string, text: string): Promise<void> {
  await atomicWriteFile(path, Buffer.from(text, 'utf8'));
}
