/**
 * `runSeries`: the library's one call for what `lamella series` does — map a photo series (a
 * folder's frames, glob patterns, one video or one multi-page TIFF) on worker threads,
 * resumable and shardable, then aggregate `series.csv`, `series.json` and `report.html` in
 * `outDir`. Progress comes through `onProgress`; an AbortSignal stops it cleanly (finished frames
 * are kept, a rerun resumes).
 */
import { availableParallelism } from 'node:os';
import { join, resolve } from 'node:path';
import { stat } from 'node:fs/promises';
import { InputError, UsageError } from '../errors.js';
import { stackFromOptions, type StackCliOptions } from '../optics/stackSettings.js';
import { resolveLight } from '../colour/index.js';
import type { CameraSpec } from '../colour/cameraSpec.js';
import { loadCalibrationForRun } from '../calibrate/calibrationFile.js';
import { checkRegion } from '../map/filmMask.js';
import { readMask } from '../map/mapPhoto.js';
import type { Anchor, FilmAreaMode } from '../map/types.js';
import { DEFAULT_MAX_THICKNESS_NM, defaultThinBelowNm } from '../map/mapDefaults.js';
import { notedInputFiles } from '../io/inputFiles.js';
import { MAP_FRAME_PROCESSOR_URL, type MapFrameConfig } from '../series/mapFrameConfig.js';
import { runSeries as runSeriesEngine, DEFAULT_CHUNK_FRAMES, type SeriesOptions, type SeriesPlan, type SeriesResult } from '../series/runSeries.js';
import { runFlow, type FlowOptions, type FlowProgress, type FlowResult } from '../flow/runFlow.js';
import { SERIES_FLOW_DIR } from '../series/seriesReportInput.js';
import type { Shard } from '../series/parseShard.js';
import type { FrameEvent, SeriesProgress } from '../series/types.js';
import { checkInspectOptions, type InspectOptions } from '../inspect/inspectMap.js';
import { passRuleText, specSearchRangeNm } from '../inspect/spec.js';

/** The film stack as the CLI's `--stack`, `--film-index`, `--angle` (degrees) and `--extrapolate` give it. */
export type StackSettings = StackCliOptions;

export interface RunSeriesOptions extends StackSettings {
  /** The light: a CIE illuminant (D65, A, F11, …), a blackbody (`bb:3200`), a line (`line:589`) or an SPD file. */
  readonly light: string;
  /** The camera's white balance left at another light (default: balanced to `light`). */
  readonly whiteBalance?: string | null;
  readonly camera?: CameraSpec;
  /** Output folder (created if missing; a rerun into it resumes). */
  readonly outDir: string;
  /** Frame rate or interval for frames without an EXIF time (for a video: overrides its timestamps). */
  readonly fps?: number | null;
  readonly intervalS?: number | null;
  /** Frames from `startS` to `endS` (seconds from the first frame), every `every`-th of them. */
  readonly select?: { readonly startS?: number | null; readonly endS?: number | null; readonly every?: number | null } | null;
  /** Colour range of the previews and the report's frame slider, nm (default: the series' own). */
  readonly rangeNm?: readonly [number, number] | null;
  /** Thin (rupture-risk) threshold, nm (default 50 for the `soap-film` preset, else none). */
  readonly thinBelowNm?: number | null;
  /** Largest thickness considered, nm (default 2000). */
  readonly maxThicknessNm?: number;
  readonly region?: readonly [number, number, number, number] | null;
  /** A mask image's path: only where it is non-zero is film. */
  readonly mask?: string | null;
  readonly anchors?: readonly Anchor[];
  readonly pixelSizeUm?: number | null;
  readonly filmArea?: FilmAreaMode;
  readonly expectNm?: readonly [number, number] | null;
  readonly lightField?: 'auto' | 'off';
  /** A calibration file from `lamella calibrate` (instead of fitting the photo formation on every frame). */
  readonly calibration?: string | null;
  readonly ignoreCalibrationMismatch?: boolean;
  /** Worker threads (default: the available cores). */
  readonly workers?: number;
  readonly chunkFrames?: number;
  /** Map only this part of the series (then aggregate what `outDir` holds). */
  readonly shard?: Shard | null;
  readonly aggregateOnly?: boolean;
  /** Also write a map and a flags preview per frame. */
  readonly previews?: boolean;
  /** Write report.html (default true). */
  readonly report?: boolean;
  readonly allowDamaged?: boolean;
  /**
   * Each frame's coating inspection (src/inspect): spec share and verdict in series.csv and
   * series.json, uniformity in the frame records. A spec without `expectNm` also keeps the order
   * search near it (as `mapPhotos`). Points and profiles are for `map` only.
   */
  readonly inspect?: Pick<InspectOptions, 'spec' | 'passIf' | 'edgeExclusionMm' | 'part'> | null;
  /**
   * Also compute the film's flow once the frames are mapped (what `lamella flow OUT --out OUT/flow`
   * does; true, or its settings) and show it in the report. Not on a shard run: run it with
   * `aggregateOnly` once all shards are done.
   */
  readonly flow?: boolean | Omit<FlowOptions, 'outDir' | 'shard' | 'aggregateOnly'>;
}

export interface RunSeriesHooks {
  /** After each frame: what happened to it and how far the series is. */
  readonly onProgress?: (progress: SeriesProgress, event: FrameEvent) => void;
  /** Once the frames to map are known (how many, and why on a rerun). */
  readonly onPlan?: (plan: SeriesPlan) => void;
  /** Aborting stops the series after the frames in flight; `interrupted` is then true. */
  readonly signal?: AbortSignal;
  /** A warning about the settings, before any frame (e.g. a material used outside its range). */
  readonly onWarning?: (message: string) => void;
  /** With `flow`: after each frame pair of the flow. */
  readonly onFlowProgress?: (progress: FlowProgress) => void;
}

/** A series' result, with its flow when asked for (null when not computed). */
export type RunSeriesResult = SeriesResult & { readonly flow: FlowResult | null };


/**
 * Maps a photo series and aggregates it (see the module comment).
 *
 * @param inputs photos, folders of photos or glob patterns (frames in natural order of their names), or one video or multi-page TIFF
 * @param options the film, the light, where to write and how to map
 * @param hooks progress, plan and an AbortSignal
 * @throws UsageError for settings that cannot work (a region outside the frames, a calibration of another size), InputError for unreadable inputs
 * @example
 * const controller = new AbortController();
 * const result = await runSeries(['frames/'], { stack: 'soap-film', light: 'D65', fps: 2, outDir: 'out' }, {
 *   signal: controller.signal,
 *   onProgress: (p) => console.log(`${p.done}/${p.total}`),
 * });
 */
export async function runSeries(inputs: readonly string[], options: RunSeriesOptions, hooks: RunSeriesHooks = {}): Promise<RunSeriesResult> {
  const job = await seriesJobOptions(inputs, options, hooks.onWarning);
  const result = await runSeriesEngine({
    ...job,
    ...(hooks.signal ? { signal: hooks.signal } : {}),
    ...(hooks.onPlan ? { onPlan: hooks.onPlan } : {}),
    ...(hooks.onProgress ? { onFrame: (event: FrameEvent, progress: SeriesProgress) => hooks.onProgress!(progress, event) } : {}),
  });
  if (!options.flow) return { ...result, flow: null };
  return flowAfterSeries(job, result, options.flow === true ? {} : options.flow, hooks);
}

/**
 * The flow step of `series --flow`: once the series is mapped (not interrupted, not a shard), the
 * flow into OUT/flow, then the aggregation again so that the report shows it. A series with fewer
 * than two mapped frames gets a warning, not an error.
 */
export async function flowAfterSeries(
  job: SeriesOptions, result: SeriesResult, flowOptions: Omit<FlowOptions, 'outDir' | 'shard' | 'aggregateOnly'>,
  hooks: { readonly signal?: AbortSignal; readonly onFlowProgress?: (progress: FlowProgress) => void } = {},
): Promise<RunSeriesResult> {
  if (result.interrupted || hooks.signal?.aborted) return { ...result, flow: null };
  if (job.shard) {
    return { ...result, flow: null, warnings: [...result.warnings, 'flow: not computed by a shard run; once all shards are done, aggregate with the flow (aggregate-only with flow), or run `lamella flow OUT --out OUT/flow`'] };
  }
  const outDir = resolve(job.cwd ?? process.cwd(), job.outDir);
  let flow: FlowResult;
  try {
    flow = await runFlow(outDir, { ...flowOptions, outDir: join(outDir, SERIES_FLOW_DIR) }, {
      ...(hooks.signal ? { signal: hooks.signal } : {}), ...(hooks.onFlowProgress ? { onProgress: hooks.onFlowProgress } : {}),
    });
  } catch (error) {
    if (error instanceof InputError && /the flow needs at least two/.test(error.message)) {
      return { ...result, flow: null, warnings: [...result.warnings, `flow: ${error.message.slice(error.file.length + 2)}`] };
    }
    throw error;
  }
  const warnings = [...result.warnings, ...flow.warnings.map((w) => `flow: ${w}`)];
  if (flow.interrupted) return { ...result, interrupted: true, flow, warnings };
  // The report is written by the aggregation: aggregate again (nothing is mapped) to show the flow.
  if (job.report !== false) {
    const again = await runSeriesEngine({ ...job, aggregateOnly: true, ...(hooks.signal ? { signal: hooks.signal } : {}) });
    if (again.interrupted) return { ...result, interrupted: true, flow, warnings };
  }
  return { ...result, flow, warnings };
}

/** The engine's options for a series (everything but the callbacks and the signal). */
export async function seriesJobOptions(inputs: readonly string[], options: RunSeriesOptions, onWarning: (message: string) => void = () => undefined): Promise<SeriesOptions> {
  const { angleRad } = stackFromOptions(options, { onWarning });
  // Lights are checked here, once, not by every frame's worker.
  resolveLight(options.light);
  if (options.whiteBalance) resolveLight(options.whiteBalance);
  const camera = options.camera ?? 'srgb';
  const lightField = options.lightField ?? 'auto';
  const thinBelowNm = options.thinBelowNm !== undefined ? options.thinBelowNm : defaultThinBelowNm(options.stack);
  const maxThicknessNm = options.maxThicknessNm ?? DEFAULT_MAX_THICKNESS_NM;
  const region = options.region ?? null;
  const anchors = options.anchors ?? [];
  const pixelSizeUm = options.pixelSizeUm ?? null;
  const filmArea = options.filmArea ?? 'auto';
  const inspect = options.inspect ?? null;
  if (inspect) checkInspectOptions(inspect, options.pixelSizeUm ?? null);
  const expectNm = options.expectNm ?? (inspect?.spec ? specSearchRangeNm(inspect.spec, maxThicknessNm) : null);
  const rangeNm = options.rangeNm ?? null;
  const calibration = options.calibration
    ? await loadCalibrationForRun(options.calibration, { stack: options.stack ?? '', light: options.light, angleRad, whiteBalanceLight: options.whiteBalance ?? null, camera, ignoreMismatch: options.ignoreCalibrationMismatch === true })
    : null;
  const stackOptions: StackCliOptions = { stack: options.stack, filmIndex: options.filmIndex, angle: options.angle, extrapolate: options.extrapolate };
  const whiteBalanceLight = options.whiteBalance ?? null;
  const maskPath = options.mask ? resolve(options.mask) : null;
  if (maskPath) {
    const info = await stat(maskPath).catch(() => null);
    if (!info || !info.isFile()) throw new InputError(options.mask ?? '', '--mask: no such image file');
  }
  const config: MapFrameConfig = {
    stackOptions, light: options.light, whiteBalanceLight, camera, thinBelowNm, maxThicknessNm,
    filmIndexScale: calibration?.filmIndexScale ?? null, exposureFixed: calibration?.exposureFixed ?? null,
    ...(rangeNm !== null ? { rangeNm } : {}),
    exposureFieldFixed: calibration?.exposureField
      ? { ...calibration.exposureField, file: options.calibration!, ignoreSizeMismatch: options.ignoreCalibrationMismatch === true }
      : null,
    lightField,
    region, maskPath, anchors, pixelSizeUm, filmArea, expectNm,
    ...(options.allowDamaged ? { allowDamaged: true } : {}),
    ...(inspect ? { inspect } : {}),
  };
  const select = options.select ?? null;
  return {
    inputs: [...inputs], outDir: options.outDir, fps: options.fps ?? null, intervalS: options.intervalS ?? null, thinBelowNm, shard: options.shard ?? null,
    ...(select && (select.startS != null || select.endS != null || select.every != null) ? { select } : {}),
    ...(rangeNm !== null ? { rangeNm } : {}),
    chunkFrames: options.chunkFrames ?? DEFAULT_CHUNK_FRAMES,
    workers: options.workers ?? availableParallelism(),
    aggregateOnly: options.aggregateOnly === true, previews: options.previews === true, report: options.report ?? true,
    mapSettings: {
      ...stackOptions, light: options.light, whiteBalanceLight, thinBelowNm, maxThicknessNm,
      // Part of the settings hash (a sensitivities CSV also by content, through inputFiles).
      ...(camera !== 'srgb' ? { camera } : {}),
      ...(region ? { region } : {}), ...(maskPath ? { mask: maskPath } : {}),
      ...(anchors.length > 0 ? { anchors } : {}), ...(pixelSizeUm !== null ? { pixelSizeUm } : {}),
      ...(options.allowDamaged ? { allowDamaged: true } : {}),
      // Part of the settings hash: changing either re-maps the frames.
      filmArea, ...(expectNm !== null ? { expectNm } : {}),
      ...(lightField !== 'auto' ? { lightField } : {}),
      // Part of the settings hash: a new spec or rule re-judges (and may re-map) the frames.
      ...(inspect ? { inspect: {
        spec: inspect.spec?.text ?? null, passIf: inspect.spec ? passRuleText(inspect.passIf ?? { kind: 'in-spec', minShare: 0.99 }) : null,
        edgeExclusionMm: inspect.edgeExclusionMm ?? null, part: inspect.part ? `${inspect.part.kind} ${inspect.part.sizeMm} mm` : null,
      } } : {}),
    },
    calibration: calibration?.raw ?? null,
    // Stack, material, SPD and calibration files read above, and the mask: by content.
    inputFiles: [...notedInputFiles(), ...(maskPath ? [{ path: maskPath, role: '--mask' }] : [])],
    processor: { moduleUrl: MAP_FRAME_PROCESSOR_URL, config },
    // Region, anchors and mask against the frames, once, before any frame is mapped.
    checkFrameSize: async ({ width, height }: { width: number; height: number }) => {
      const frames = `${width}×${height} frames`;
      if (region) {
        try {
          checkRegion(region, width, height, 'frames');
        } catch (error) {
          throw new UsageError(error instanceof Error ? error.message : String(error));
        }
      }
      for (const a of anchors) {
        if (!(a.x >= 0 && a.x < width && a.y >= 0 && a.y < height)) throw new UsageError(`--anchor ${a.x},${a.y} lies outside the ${frames}`);
      }
      if (maskPath) await readMask(maskPath, width, height);
      const field = config.exposureFieldFixed;
      if (field && !field.ignoreSizeMismatch && (field.widthPx !== width || field.heightPx !== height)) {
        throw new UsageError(
          `--calibration ${field.file}: its light field was fitted on a ${field.widthPx}×${field.heightPx} photo, the frames are ${width}×${height} (calibrate on a frame of this size, or add --ignore-calibration-mismatch to stretch it over the frames)`,
        );
      }
    },
  };
}
