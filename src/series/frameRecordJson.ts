/**
 * `frames/<stem>.json` on disk: the FrameRecord (./types.ts) in Lamella's JSON convention
 * (snake_case keys, units in names, `schema_version`; ../io/jsonKeys.ts) and back. Records written
 * before the convention (camelCase, no `schema_version`) are read as they are, so a run resumes
 * over an older run's frames.
 */
import { camelCaseKeysShallow, snakeCaseKeys } from '../io/jsonKeys.js';
import type { FrameRecord } from './types.js';

/** Version of the frame record's JSON form (schemas/series-frame.schema.json). */
export const FRAME_SCHEMA_VERSION = 1;

/** Keys whose objects are maps keyed by data ("role path" → SHA-256): their keys are kept. */
const DATA_KEYED = new Set(['input_files']);

export function frameRecordToJson(record: FrameRecord): Record<string, unknown> {
  const { format, version, ...rest } = record;
  return { format, version, schema_version: FRAME_SCHEMA_VERSION, ...(snakeCaseKeys(rest, DATA_KEYED) as Record<string, unknown>) };
}

function objectOrNull(value: unknown): value is Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value);
}

/** The FrameRecord of a parsed `frames/<stem>.json` (either form), or null when it is not one. */
export function frameRecordFromJson(json: unknown): FrameRecord | null {
  if (!objectOrNull(json) || json.format !== 'lamella-series-frame') return null;
  if (json.schema_version === undefined) return json as unknown as FrameRecord; // written before the convention
  // Only the blocks that are camelCase in memory are turned back; `stats`, `fit_quality` and the
  // film area's `excluded_px` are snake_case in memory too, and `input_files` is keyed by paths.
  const { schema_version: _version, lamella_version, stats, fit_quality, input_files, ...rest } = json;
  const top = camelCaseKeysShallow<Record<string, unknown>>(rest);
  const fitted = camelCaseKeysShallow<Record<string, unknown>>(top.fitted);
  return {
    ...top,
    ...(lamella_version !== undefined ? { lamella_version } : {}),
    stats,
    ...(fit_quality !== undefined ? { fitQuality: fit_quality } : {}),
    ...(input_files !== undefined ? { inputFiles: input_files } : {}),
    fitted,
    thinRegions: Array.isArray(top.thinRegions) ? top.thinRegions.map((r) => camelCaseKeysShallow(r)) : top.thinRegions,
    ...(top.filmArea !== undefined ? { filmArea: camelCaseKeysShallow(top.filmArea) } : {}),
    ...(top.exposureField !== undefined ? { exposureField: camelCaseKeysShallow(top.exposureField) } : {}),
    ...(top.lightEvenness !== undefined ? { lightEvenness: camelCaseKeysShallow(top.lightEvenness) } : {}),
    ...(top.source !== undefined ? { source: camelCaseKeysShallow(top.source) } : {}),
  } as unknown as FrameRecord;
}
