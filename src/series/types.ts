/**
 * Records of the series engine (`src/series`): frames in, per-frame results on disk, aggregated
 * rows and drainage fits out. Everything that crosses a worker boundary is plain data.
 */
import type { MapResult } from '../map/types.js';
import type { MapReportInput } from '../report/types.js';

/** One input frame after expansion and timing. `index` is its place in the whole, ordered input list. */
export interface FrameJob {
  readonly index: number;
  readonly path: string;
  /** File name of the input (the `frame` column). */
  readonly name: string;
  /** File name without extension: prefix of the per-frame outputs in `frames/`. */
  readonly stem: string;
  /** The frame file's fingerprint when known (./frameSource.ts): a changed photo is mapped again. */
  readonly source?: FrameSource;
}

/** Size, modification time and SHA-256 of a frame's file. */
export interface FrameSource {
  readonly sizeBytes: number;
  readonly mtimeMs: number;
  readonly sha256: string;
}

/**
 * Maps one frame; bound once to the map settings, called with the previous frame's map as order
 * prior, its fitted photo formation as the start of this frame's fit and its pixel statuses,
 * whose film area is the prior of this frame's (all null for the first frame of a chunk).
 */
export interface FrameProcessor {
  map(framePath: string, prior: Float32Array | null, previousFit?: MapResult['fitted'] | null, priorStatus?: Uint8Array | null): Promise<MapResult>;
  /** Optional preview writer (`--previews`): writes images for `stem` into `dir`. */
  writePreviews?(result: MapResult, framePath: string, dir: string, stem: string): Promise<unknown>;
  /** Optional: the single-map report view of a frame (used for the series report's last frame). */
  mapReportInput?(result: MapResult, framePath: string): Promise<MapReportInput>;
}

/**
 * How workers obtain a processor: the URL of an ES module exporting
 * `createFrameProcessor(config): Promise<FrameProcessor>`, and its JSON-serialisable config.
 */
export interface ProcessorSource {
  readonly moduleUrl: string;
  readonly config: unknown;
}

export type FrameOutcome = 'mapped' | 'skipped' | 'failed';

export interface FrameEvent {
  readonly index: number;
  readonly name: string;
  readonly outcome: FrameOutcome;
  /** For failures: one line naming the frame and the reason. */
  readonly message?: string;
}

export interface SeriesProgress {
  readonly done: number;
  readonly total: number;
  readonly mapped: number;
  readonly skipped: number;
  readonly failed: number;
  readonly elapsedMs: number;
}

/** Contents of `frames/<stem>.json`: written last, so its presence marks a complete frame. */
export interface FrameRecord {
  readonly format: 'lamella-series-frame';
  readonly version: 1;
  readonly frame: string;
  readonly stem: string;
  readonly settingsHash: string;
  readonly width: number;
  readonly height: number;
  /** Name of the frame whose map served as the order prior, or null (first frame of a chunk). */
  readonly priorFrame: string | null;
  readonly stats: MapResult['stats'];
  readonly fitted: MapResult['fitted'];
  readonly darkLimitNm: number;
  readonly thinRegions: MapResult['thinRegions'];
  readonly warnings: readonly string[];
  /** The series' settings hash the frame was mapped with (`settingsHash` adds the frame's own file and prior). */
  readonly seriesHash?: string;
  /** The frame file it was mapped from (absent in records of older versions and test doubles). */
  readonly source?: FrameSource;
  /** SHA-256 of each data file the run read (stack, materials, calibration, mask, light), by "role path". */
  readonly inputFiles?: Readonly<Record<string, string>>;
  /**
   * The frame's film area (`found: false` when the map found no film). Absent in records written
   * before film areas existed: such a frame counts as film, its area the pixels not excluded.
   */
  readonly filmArea?: MapResult['filmArea'];
}
