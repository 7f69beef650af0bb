/**
 * The calibration file written by `lamella calibrate` and read by `map` and `series`
 * (`--calibration CAL.json`). Shape (JSON object):
 *   lamella_calibration: 1, schema_version: 1 (schemas/calibration.schema.json)
 *   applies_to: { stack, light, white_balance_light, angle_deg, camera, camera_mode }  (camera_mode:
 *     the --camera value, srgb | linear | a sensitivities CSV path; absent in older files = srgb)
 *   fitted: { exposure, white_balance: [r,g,b], flare: [r,g,b], film_index_scale, angle_deg, response }
 *     (response: { contrast, gamma, saturation } of the camera's picture style, ../colour/toneResponse.ts,
 *     or null; absent in older files = the identity)
 *   film_index_scale (top level, same value), uncertainty, known_regions, photo, photo_size_px, warnings
 *   exposure_field: { log_gain_coefficients: [7 numbers] | null, photo_size_px: [w, h], … }  (the light
 *     field fitted on the known regions, see ./fitCalibration.ts; absent in older files = none)
 * Files written before the JSON convention (no schema_version) name these fields in camelCase
 * (`whiteBalance`, `filmIndexScale`, `angleDeg`); they are read just the same.
 * A calibration made for another stack, light, angle, camera white balance or camera is refused unless
 * the user overrides.
 */
import { readFile } from 'node:fs/promises';
import { describeJsonSyntaxError, noteInputFile, regularFileProblemSync } from '../io/inputFiles.js';
import { InputError, UsageError } from '../errors.js';
import type { ExposureParameters } from '../map/types.js';
import { type CameraResponse, checkResponse } from '../colour/toneResponse.js';
import { EXPOSURE_FIELD_TERMS } from '../map/mapResultJson.js';

export const CALIBRATION_VERSION = 1;
/** Version of the file's JSON form: 1 = snake_case names; absent = the older camelCase names. */
export const CALIBRATION_SCHEMA_VERSION = 1;

export interface CalibrationForRun {
  readonly exposureFixed: ExposureParameters;
  /** The light field and the photo size it was fitted on, or null (one exposure). */
  readonly exposureField: { readonly logGainCoefficients: number[]; readonly widthPx: number; readonly heightPx: number } | null;
  readonly filmIndexScale: number | null;
  readonly angleDeg: number | null;
  readonly raw: Record<string, unknown>;
}

/** A value as the user wrote it: numbers via String() so 1e999 shows as Infinity, not null. */
function show(value: unknown): string {
  return typeof value === 'number' ? String(value) : value === undefined ? 'nothing' : JSON.stringify(value);
}

function finite(file: string, field: string, value: unknown, positive = false): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || (positive && value <= 0)) {
    throw new InputError(file, `${field} must be a finite number${positive ? ' > 0' : ''}, received ${show(value)}`);
  }
  return value;
}

function triple(file: string, field: string, value: unknown, positive = false): [number, number, number] {
  if (!Array.isArray(value) || value.length !== 3) {
    throw new InputError(file, `${field} must be an array of 3 finite numbers${positive ? ' > 0' : ''}, received ${show(value)}`);
  }
  return [0, 1, 2].map((c) => finite(file, `${field}[${c}]`, value[c], positive)) as [number, number, number];
}

export async function readCalibrationFile(file: string): Promise<CalibrationForRun & { appliesTo: Record<string, unknown> }> {
  let text: string;
  const problem = regularFileProblemSync(file);
  if (problem === 'file not found') throw new InputError(file, 'cannot read calibration file (ENOENT)');
  if (problem !== null) throw new InputError(file, `cannot read calibration file: it ${problem}`);
  noteInputFile(file, '--calibration file');
  try {
    text = await readFile(file, 'utf8');
  } catch (error) {
    throw new InputError(file, `cannot read calibration file (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (error) {
    throw new InputError(file, `calibration file is not valid JSON (${describeJsonSyntaxError(error)})`);
  }
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) throw new InputError(file, 'calibration must be a JSON object');
  const record = raw as Record<string, unknown>;
  if (record.lamella_calibration !== CALIBRATION_VERSION) {
    throw new InputError(
      file,
      record.lamella_calibration === undefined
        ? `missing field "lamella_calibration" (expected ${CALIBRATION_VERSION}); is this a file written by lamella calibrate?`
        : `lamella_calibration must be ${CALIBRATION_VERSION} (the format this version reads), received ${show(record.lamella_calibration)}`,
    );
  }
  const fitted = record.fitted;
  if (fitted === null || typeof fitted !== 'object') throw new InputError(file, 'missing field "fitted" (an object with exposure, white_balance, flare)');
  const f = fitted as Record<string, unknown>;
  // snake_case names, or the camelCase ones of files written before the JSON convention.
  const older = f.white_balance === undefined && f.whiteBalance !== undefined;
  const wbName = older ? 'whiteBalance' : 'white_balance';
  const scaleName = older ? 'filmIndexScale' : 'film_index_scale';
  const angleName = older ? 'angleDeg' : 'angle_deg';
  const scale = f[scaleName] ?? record[scaleName];
  const angle = f[angleName];
  const appliesTo = record.applies_to;
  if (appliesTo === null || typeof appliesTo !== 'object') throw new InputError(file, 'missing field "applies_to" (stack, light, angle_deg)');
  return {
    exposureFixed: {
      exposure: finite(file, 'fitted.exposure', f.exposure, true),
      whiteBalance: triple(file, `fitted.${wbName}`, f[wbName], true),
      flare: triple(file, 'fitted.flare', f.flare),
      ...responseOf(file, f.response),
    },
    exposureField: fieldOf(file, record.exposure_field),
    filmIndexScale: scale === undefined || scale === null ? null : finite(file, `fitted.${scaleName}`, scale, true),
    angleDeg: angle === undefined || angle === null ? null : finite(file, `fitted.${angleName}`, angle),
    raw: record,
    appliesTo: appliesTo as Record<string, unknown>,
  };
}

/** The stored response (absent or null = identity), checked: an object of three numbers in the allowed ranges. */
function responseOf(file: string, value: unknown): { response: CameraResponse | null; responseSource: 'calibration' | 'identity' } {
  if (value === undefined || value === null) return { response: null, responseSource: 'identity' };
  if (typeof value !== 'object' || Array.isArray(value)) throw new InputError(file, `fitted.response must be an object {contrast, gamma, saturation} or null, received ${show(value)}`);
  const r = value as Record<string, unknown>;
  const response = {
    contrast: finite(file, 'fitted.response.contrast', r.contrast),
    gamma: finite(file, 'fitted.response.gamma', r.gamma, true),
    saturation: finite(file, 'fitted.response.saturation', r.saturation, true),
  };
  try {
    checkResponse(response);
  } catch (error) {
    throw new InputError(file, `fitted.${(error as Error).message}`);
  }
  return { response, responseSource: 'calibration' };
}

/** The stored light field (see the header), or null when the file holds none. */
function fieldOf(file: string, value: unknown): CalibrationForRun['exposureField'] {
  if (value === undefined || value === null) return null;
  if (typeof value !== 'object' || Array.isArray(value)) throw new InputError(file, `exposure_field must be an object, received ${show(value)}`);
  const field = value as Record<string, unknown>;
  if (field.log_gain_coefficients === null || field.log_gain_coefficients === undefined) return null;
  const c = field.log_gain_coefficients;
  if (!Array.isArray(c) || c.length !== EXPOSURE_FIELD_TERMS.length) {
    throw new InputError(file, `exposure_field.log_gain_coefficients must be an array of ${EXPOSURE_FIELD_TERMS.length} finite numbers (${EXPOSURE_FIELD_TERMS.join(', ')}), received ${show(c)}`);
  }
  const coefficients = c.map((v, k) => finite(file, `exposure_field.log_gain_coefficients[${k}]`, v));
  const size = field.photo_size_px;
  if (!Array.isArray(size) || size.length !== 2 || !size.every((v) => Number.isInteger(v) && (v as number) > 0)) {
    throw new InputError(file, `exposure_field.photo_size_px must be [width, height] in whole pixels, received ${show(size)}`);
  }
  return { logGainCoefficients: coefficients, widthPx: size[0] as number, heightPx: size[1] as number };
}

/** Largest difference between the calibration's angle and the run's that passes unremarked, degrees. */
const ANGLE_TOLERANCE_DEG = 0.5;

/**
 * Reads a calibration and checks it was made for this stack, light and angle of incidence (the
 * fitted angle when `--fit …,angle` was used), and, when the caller gives `whiteBalanceLight`
 * (null = the light itself), for the same camera white balance.
 */
export async function loadCalibrationForRun(
  file: string,
  run: { stack: string; light: string; angleRad: number; ignoreMismatch: boolean; whiteBalanceLight?: string | null; camera?: string | null },
): Promise<CalibrationForRun> {
  const calibration = await readCalibrationFile(file);
  const { appliesTo } = calibration;
  if (!run.ignoreMismatch) {
    const wayOut = '(add --ignore-calibration-mismatch to use it anyway)';
    if (appliesTo.stack !== run.stack) {
      throw new UsageError(`--calibration ${file} was made for stack '${String(appliesTo.stack)}', not '${run.stack}' ${wayOut}`);
    }
    if (appliesTo.light !== run.light) {
      throw new UsageError(`--calibration ${file} was made for light '${String(appliesTo.light)}', not '${run.light}' ${wayOut}`);
    }
    const madeForBalance = appliesTo.white_balance_light ?? null;
    if (run.whiteBalanceLight !== undefined && madeForBalance !== run.whiteBalanceLight) {
      const name = (v: unknown): string => (v === null ? 'the light itself' : `'${String(v)}'`);
      throw new UsageError(
        `--calibration ${file} was made with the camera white-balanced for ${name(madeForBalance)}, not ${name(run.whiteBalanceLight)} (give the same --white-balance, or add --ignore-calibration-mismatch to use it anyway)`,
      );
    }
    // Files written before `--camera` existed were all made with the sRGB camera.
    const madeWithCamera = typeof appliesTo.camera_mode === 'string' ? appliesTo.camera_mode : 'srgb';
    if (run.camera !== undefined && madeWithCamera !== (run.camera ?? 'srgb')) {
      throw new UsageError(
        `--calibration ${file} was made with --camera ${madeWithCamera}, not ${run.camera ?? 'srgb'} (give the same --camera, or add --ignore-calibration-mismatch to use it anyway)`,
      );
    }
    const fittedNames = calibration.raw.fitted_parameters;
    const angleFitted = Array.isArray(fittedNames) && fittedNames.includes('angle') && calibration.angleDeg !== null;
    const madeAtDeg = angleFitted ? calibration.angleDeg : appliesTo.angle_deg;
    const runDeg = (run.angleRad * 180) / Math.PI;
    if (typeof madeAtDeg === 'number' && Number.isFinite(madeAtDeg) && Math.abs(madeAtDeg - runDeg) > ANGLE_TOLERANCE_DEG) {
      const at = `${Math.round(madeAtDeg * 100) / 100}`;
      throw new UsageError(
        `--calibration ${file} was ${angleFitted ? 'fitted at' : 'made for'} an angle of ${at}°, not ${Math.round(runDeg * 100) / 100}° (give --angle ${at}, or add --ignore-calibration-mismatch to use it anyway)`,
      );
    }
  }
  return calibration;
}
