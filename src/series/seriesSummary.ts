/**
 * `series.json`: the settings and calibration a series was mapped with, its frame count and
 * coverage, the rupture (./rupture.ts; null when the film lasts to the last frame), what the
 * frames observed (./observations.ts) and the drainage fits with their threshold-crossing predictions. Contains no clock time, so identical
 * inputs give identical files.
 */
import type { DrainageFit } from './fits/fitDrainage.js';
import { LAMELLA_VERSION } from '../version.js';
import { snakeCaseKeys } from '../io/jsonKeys.js';
import type { SeriesRow } from './seriesRows.js';
import type { RuptureRecord } from './rupture.js';
import { observeSeries, type SeriesObservations } from './observations.js';

export interface SeriesSummaryInput {
  readonly settings: Record<string, unknown>;
  readonly calibration: Record<string, unknown> | null;
  readonly frames: number;
  /** How the inputs' frames came down to `frames` (see SeriesSummary.frames). */
  readonly inputCounts?: { readonly inputs: number; readonly unreadable: number; readonly outsideSelection: number };
  readonly rows: readonly SeriesRow[];
  readonly missing: readonly string[];
  readonly fits: readonly DrainageFit[];
  readonly rupture: RuptureRecord | null;
  readonly size: { readonly width: number; readonly height: number } | null;
  readonly warnings: readonly string[];
  readonly inputFiles?: Readonly<Record<string, string>>;
}

export interface SeriesSummary {
  readonly format: 'lamella-series';
  readonly version: 1;
  /** Which Lamella made it (`--version`). */
  readonly lamella_version: string;
  /** SHA-256 of the data files the frames depend on, by "role path" (each frame's own file is in its record). */
  readonly input_files: Readonly<Record<string, string>>;
  readonly settings: Record<string, unknown>;
  readonly calibration: Record<string, unknown> | null;
  /**
   * `inputs` frames were found in the inputs; `unreadable` of them could not be read or had another
   * size, `outsideSelection` were left out by --start/--end/--every; the other `total` are the
   * series, of which `withResults` have a current result (rows of series.csv) and `missing` none.
   */
  readonly frames: {
    readonly inputs: number;
    readonly unreadable: number;
    readonly outsideSelection: number;
    readonly total: number;
    readonly withResults: number;
    readonly missing: readonly string[];
    readonly width: number | null;
    readonly height: number | null;
  };
  readonly timeRangeS: readonly [number, number] | null;
  /** Last frame with film and first frame without, when the film is gone from a frame on; else null. */
  readonly rupture: RuptureRecord | null;
  /** What the frames show first (the first thin region, the recent thinning rate), and reliable crossings only (./observations.ts). */
  readonly observations: SeriesObservations;
  readonly drainageFits: readonly DrainageFit[];
  /** With `--spec`: how many frames pass, and each frame's share in spec and verdict; absent without. */
  readonly inspection?: {
    readonly framesJudged: number;
    readonly framesPassed: number;
    readonly framesFailed: number;
    readonly perFrame: ReadonlyArray<{ readonly frame: string; readonly inSpecFraction: number | null; readonly pass: boolean | null }>;
  };
  readonly caution: string;
  readonly warnings: readonly string[];
}

export const SERIES_CAUTION =
  'Thicknesses and predicted crossing times are estimates from photographs and fitted laws; predictions beyond the last frame are extrapolations, and none is made past a rupture. Do not base release or safety decisions on them without qualified metrology.';

/** Version of `series.json`'s form (schemas/series.schema.json). */
export const SERIES_SCHEMA_VERSION = 1;

/**
 * `series.json` as written: the summary in Lamella's JSON convention (snake_case keys with units,
 * ../io/jsonKeys.ts), numbers as numbers (the angle as `angle_deg`) and a `schema_version`. The
 * calibration embedded is normalised too (a file written before the convention had camelCase keys).
 */
export function seriesSummaryJson(summary: SeriesSummary): Record<string, unknown> {
  const { format, version, ...rest } = summary;
  const json = snakeCaseKeys(rest, new Set(['input_files'])) as Record<string, unknown>;
  // The --angle text as typed is hashed into the settings; the record states it as a number, in degrees.
  const settings = Object.fromEntries(
    Object.entries(json.settings as Record<string, unknown>).map(([key, value]) =>
      key === 'angle' && (typeof value === 'number' || (typeof value === 'string' && value.trim() !== '' && Number.isFinite(Number(value))))
        ? ['angle_deg', Number(value)]
        : [key, value],
    ),
  );
  return { format, version, schema_version: SERIES_SCHEMA_VERSION, ...json, settings };
}

export function seriesSummary(input: SeriesSummaryInput): SeriesSummary {
  const times = input.rows.map((r) => r.timeS);
  return {
    format: 'lamella-series',
    version: 1,
    lamella_version: LAMELLA_VERSION,
    input_files: { ...(input.inputFiles ?? {}) },
    settings: input.settings,
    calibration: input.calibration,
    frames: {
      inputs: input.inputCounts?.inputs ?? input.frames,
      unreadable: input.inputCounts?.unreadable ?? 0,
      outsideSelection: input.inputCounts?.outsideSelection ?? 0,
      total: input.frames,
      withResults: input.rows.length,
      missing: [...input.missing],
      width: input.size?.width ?? null,
      height: input.size?.height ?? null,
    },
    timeRangeS: times.length > 0 ? [Math.min(...times), Math.max(...times)] : null,
    rupture: input.rupture,
    observations: observeSeries(input.rows, input.fits, input.rupture),
    drainageFits: [...input.fits],
    ...(input.rows.some((r) => r.specPass !== undefined) ? { inspection: specSummary(input.rows) } : {}),
    caution: SERIES_CAUTION,
    warnings: [...input.warnings],
  };
}

function specSummary(rows: readonly SeriesRow[]): NonNullable<SeriesSummary['inspection']> {
  const judged = rows.filter((r) => r.specPass !== undefined && r.specPass !== null);
  const passed = judged.filter((r) => r.specPass === true).length;
  return {
    framesJudged: judged.length,
    framesPassed: passed,
    framesFailed: judged.length - passed,
    perFrame: rows.map((r) => ({ frame: r.frame, inSpecFraction: r.inSpecFraction ?? null, pass: r.specPass ?? null })),
  };
}
