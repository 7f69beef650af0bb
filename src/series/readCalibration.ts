/**
 * Reads the photo-formation calibration a series uses instead of fitting exposure, white balance
 * and flare on every frame (`--calibration CAL.json`). Accepted shapes (JSON object):
 *   { "exposureFixed": { "exposure": 6.2, "whiteBalance": [r, g, b], "flare": [r, g, b] } }
 *   { "fitted": { … same fields … } }            (e.g. the JSON written for a single map)
 *   { "exposure": 6.2, "whiteBalance": [...], "flare": [...] }
 * plus an optional top-level "filmIndexScale". Errors name the file and the field.
 */
import { readFile } from 'node:fs/promises';
import { InputError } from '../cli/errors.js';
import type { ExposureParameters } from '../map/types.js';

export interface SeriesCalibration {
  readonly exposureFixed: ExposureParameters;
  readonly filmIndexScale: number | null;
  /** The file's parsed contents, recorded in series.json. */
  readonly raw: Record<string, unknown>;
}

function triple(file: string, field: string, value: unknown): [number, number, number] {
  if (!Array.isArray(value) || value.length !== 3 || !value.every((v) => typeof v === 'number' && Number.isFinite(v))) {
    throw new InputError(file, `${field} must be an array of 3 finite numbers, received ${JSON.stringify(value)}`);
  }
  return [value[0], value[1], value[2]];
}

export async function readCalibration(file: string): Promise<SeriesCalibration> {
  let raw: unknown;
  try {
    raw = JSON.parse(await readFile(file, 'utf8'));
  } catch (error) {
    throw new InputError(file, `cannot read calibration JSON (${error instanceof Error ? error.message : String(error)})`);
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) throw new InputError(file, 'calibration must be a JSON object');
  const record = raw as Record<string, unknown>;
  const source = (record.exposureFixed ?? record.fitted ?? record) as Record<string, unknown>;
  const field = record.exposureFixed ? 'exposureFixed.' : record.fitted ? 'fitted.' : '';
  if (source === null || typeof source !== 'object') throw new InputError(file, `${field || 'calibration'} must be an object`);
  const exposure = source.exposure;
  if (typeof exposure !== 'number' || !Number.isFinite(exposure) || exposure <= 0) {
    throw new InputError(file, `${field}exposure must be a finite number > 0, received ${JSON.stringify(exposure)}`);
  }
  const scale = record.filmIndexScale;
  if (scale !== undefined && (typeof scale !== 'number' || !Number.isFinite(scale) || scale <= 0)) {
    throw new InputError(file, `filmIndexScale must be a finite number > 0, received ${JSON.stringify(scale)}`);
  }
  return {
    exposureFixed: {
      exposure,
      whiteBalance: triple(file, `${field}whiteBalance`, source.whiteBalance),
      flare: triple(file, `${field}flare`, source.flare ?? [0, 0, 0]),
    },
    filmIndexScale: typeof scale === 'number' ? scale : null,
    raw: record,
  };
}
