/**
 * Records of the series engine (`src/series`): frames in, per-frame results on disk, aggregated
 * rows and drainage fits out. Everything that crosses a worker boundary is plain data.
 */
import type { MapResult } from '../map/types.js';
import type { MapReportInput } from '../report/types.js';
import type { Photo } from '../io/photo.js';

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
  /**
   * A frame inside a video file or a multi-page image stack (`path` is that file): its kind and
   * its index in the file, from 0 (./containerFrames.ts). Absent for a frame that is a file.
   */
  readonly container?: { readonly kind: 'video' | 'stack'; readonly index: number };
}

/** Size, modification time and SHA-256 of a frame's file. */
export interface FrameSource {
  readonly sizeBytes: number;
  readonly mtimeMs: number;
  readonly sha256: string;
}

/**
 * Maps one frame; bound once to the map settings, called with the previous frame's map as order
 * prior, its fitted photo formation and its light field (log-gain coefficients) as the start of
 * this frame's fit, and its pixel statuses, whose film area is the prior of this frame's (all null
 * for the first frame of a chunk).
 */
export interface FrameProcessor {
  map(
    framePath: string,
    prior: Float32Array | null,
    previousFit?: MapResult['fitted'] | null,
    previousField?: readonly number[] | null,
    priorStatus?: Uint8Array | null,
  ): Promise<MapResult>;
  /**
   * Maps a frame already decoded (a video's or a stack's frame, ./frameReader.ts); `name` names
   * it in messages. Needed for series from video files and stacks.
   */
  mapPhoto?(
    photo: Photo,
    name: string,
    prior: Float32Array | null,
    previousFit?: MapResult['fitted'] | null,
    previousField?: readonly number[] | null,
    priorStatus?: Uint8Array | null,
  ): Promise<MapResult>;
  /** Optional preview writer (`--previews`): writes images for `stem` into `dir`; may say the colour range it used. */
  writePreviews?(result: MapResult, framePath: string, dir: string, stem: string): Promise<{ rangeNm?: [number, number] } | void | unknown>;
  /** Optional: (re)draws a stored frame's map preview in the series' common colour range. */
  renderStoredPreview?(stored: StoredFrame, framePath: string, dir: string, stem: string, rangeNm: readonly [number, number]): Promise<void>;
  /** Optional: the single-map report view of a frame (used for the series report's last frame). */
  mapReportInput?(result: MapResult, framePath: string): Promise<MapReportInput>;
  /** Optional: the report view of a frame's stored result and its decoded photo (no second mapping). */
  storedReportInput?(stored: StoredFrame, photo: Photo, framePath: string): Promise<MapReportInput>;
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
  /** Which Lamella mapped it (absent in older records). */
  readonly lamella_version?: string;
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
  /** The light field the frame was mapped with (exact coefficients; absent or null = one exposure). */
  readonly exposureField?: MapResult['exposureField'];
  /** How evenly the frame's film was lit after the map (src/map/lightEvenness.ts). */
  readonly lightEvenness?: MapResult['lightEvenness'];
  /** How well the model explains the frame's colours (absent in older records). */
  readonly fitQuality?: MapResult['fitQuality'];
  /** The frame's coating inspection (JSON form of src/inspect/inspectMap.ts) with `--spec` and the like. */
  readonly inspection?: Record<string, unknown> | null;
  /** The colour range [min, max] nm its map preview was drawn in (with --previews). */
  readonly previewRangeNm?: readonly [number, number];
}

/** A frame's stored result as read back from `frames/` (for the report's map view). */
export interface StoredFrame {
  readonly record: FrameRecord;
  readonly thicknessNm: Float32Array;
  readonly status: Uint8Array;
  readonly confidence: Float32Array;
}
