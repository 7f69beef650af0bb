/**
 * `lamella calibrate` as a library call: read the photo, measure the known rectangles, fit,
 * and build the calibration record (see ./calibrationFile.ts for its shape), including the
 * residual colour difference per known region as CIEDE2000 (Sharma, Wu & Dalal 2005) between
 * the observed and the fitted colour, both taken as sRGB (D65).
 */
import { basename } from 'node:path';
import { cameraFromSpec, type CameraSpec, convertXyzToLab, deltaE2000, decodeSrgb, resolveLight, LINEAR_SRGB_TO_XYZ, SRGB_WHITE_XYZ } from '../colour/index.js';
import { readPhoto } from '../io/readPhoto.js';
import { notedInputFiles } from '../io/inputFiles.js';
import { provenanceOf } from '../io/provenance.js';
import { LAMELLA_VERSION } from '../version.js';
import { MAP_MAX_PIXELS } from '../io/limits.js';
import type { Stack } from '../optics/types.js';
import { CALIBRATION_SCHEMA_VERSION, CALIBRATION_VERSION } from './calibrationFile.js';
import { snakeCaseKeys } from '../io/jsonKeys.js';
import { type CalibrationField, type CalibrationParameter, fitCalibration } from './fitCalibration.js';
import { relativeGainAt } from '../map/lightEvenness.js';
import { EXPOSURE_FIELD_TERMS } from '../map/mapResultJson.js';
import { type KnownRegion, knownRegionColours } from './knownRegions.js';

export interface CalibrateOptions {
  readonly stack: Stack;
  /** The --stack value as given (preset name or file), recorded for mismatch checks. */
  readonly stackSpec: string;
  readonly light: string;
  readonly whiteBalanceLight?: string | null;
  /** The camera (../colour/cameraSpec.ts): `srgb` (default), `linear` or a sensitivities CSV. */
  readonly camera?: CameraSpec | null;
  readonly angleRad: number;
  readonly known: readonly KnownRegion[];
  readonly fit: readonly CalibrationParameter[];
  /** `auto` (default): fit a light field when the known regions are spread over the photo; `off`: one exposure. */
  readonly lightField?: 'auto' | 'off';
}

export interface CalibrationRecord extends Record<string, unknown> {
  readonly warnings: string[];
}

export async function calibratePhotoFile(path: string, options: CalibrateOptions): Promise<CalibrationRecord> {
  const photo = await readPhoto(path, { maxPixels: MAP_MAX_PIXELS });
  const record = calibrateDecoded(photo.rgb, photo.width, photo.height, basename(path), options);
  // Which Lamella made it, from which files (the photo and every data file the run read).
  return { ...record, provenance: await provenanceOf([{ path, role: 'photo' }, ...notedInputFiles()]) };
}

export function calibrateDecoded(
  rgb: Float32Array,
  width: number,
  height: number,
  photoName: string,
  options: CalibrateOptions,
): CalibrationRecord {
  const light = resolveLight(options.light);
  const whiteBalance = options.whiteBalanceLight ? resolveLight(options.whiteBalanceLight) : undefined;
  const camera = cameraFromSpec(options.camera, light, whiteBalance);
  const regions = knownRegionColours(rgb, width, height, options.known);
  const result = fitCalibration({
    stack: options.stack,
    camera,
    angleRad: options.angleRad,
    regions,
    fit: options.fit,
    photoSize: { width, height },
    lightField: options.lightField ?? 'auto',
  });
  const known = regions.map((r, k) => ({
    region_px: r.region,
    thickness_nm: r.thicknessNm,
    pixels: r.pixels,
    observed_srgb: r.colour.map(round4),
    fitted_srgb: result.predicted[k].map(round4),
    residual_delta_e2000: round4(deltaE2000(labOf(r.colour, camera.encoding), labOf(result.predicted[k], camera.encoding))),
    clipped_fraction: round4(r.clippedFraction),
  }));
  const { parameters } = result;
  // A known region the fit cannot reproduce is the first thing to check: ΔE2000 ≈ 1 is a
  // just-noticeable difference (common practice); twice that is worth a warning.
  const misfits = known
    .filter((k) => k.residual_delta_e2000 > MISFIT_DELTA_E)
    .map(
      (k) =>
        `known region ${k.region_px.join(',')} = ${k.thickness_nm} nm: the fitted colour misses the photo by ΔE2000 ${k.residual_delta_e2000.toFixed(1)} (above ${MISFIT_DELTA_E}); check the thickness given, that the region is one flat film, and the light`,
    );
  return {
    lamella_calibration: CALIBRATION_VERSION,
    schema_version: CALIBRATION_SCHEMA_VERSION,
    lamella_version: LAMELLA_VERSION,
    created: new Date().toISOString(),
    photo: photoName,
    photo_size_px: [width, height],
    applies_to: {
      stack: options.stackSpec,
      light: options.light,
      white_balance_light: options.whiteBalanceLight ?? null,
      angle_deg: (options.angleRad * 180) / Math.PI,
      camera: camera.description,
      camera_mode: options.camera ?? 'srgb',
    },
    fitted_parameters: result.fitted,
    fitted: {
      exposure: parameters.exposure,
      white_balance: parameters.whiteBalance,
      flare: parameters.flare,
      film_index_scale: parameters.filmIndexScale,
      angle_deg: parameters.angleDeg,
      // The camera's response (picture style); null = none fitted (identity). Older files lack it.
      response: parameters.response ?? null,
    },
    ...(result.responseNote ? { response_note: result.responseNote } : {}),
    film_index_scale: parameters.filmIndexScale,
    exposure_field: calibrationFieldJson(result.field, result.fieldNote, width, height),
    uncertainty: snakeCaseKeys(result.uncertainties),
    residual_rms_encoded: result.rmsResidual,
    known_regions: known,
    warnings: [...result.warnings, ...misfits],
    caution:
      'Calibrated photo thickness is still an estimate: not a substitute for qualified metrology for release or safety decisions.',
  };
}

const MISFIT_DELTA_E = 2;

/**
 * The calibration file's light field: the coefficients `map --calibration` applies (basis of
 * ../map/lightEvenness.ts, gain 1 at the photo's centre where `fitted.exposure` holds), the photo
 * size they belong to, and the field's range over the photo; `null` coefficients with the reason
 * when one exposure was used.
 */
function calibrationFieldJson(field: CalibrationField | null, note: string, width: number, height: number): Record<string, unknown> {
  if (!field) return { log_gain_coefficients: null, note };
  let gainMin = Infinity;
  let gainMax = -Infinity;
  const step = Math.max(1, Math.floor(Math.max(width, height) / 64));
  for (let y = 0; y < height; y += step) {
    for (let x = 0; x < width; x += step) {
      const gain = relativeGainAt(field.logGainCoefficients, width, height, x, y);
      if (gain < gainMin) gainMin = gain;
      if (gain > gainMax) gainMax = gain;
    }
  }
  return {
    model: 'log relative gain = quadratic in u, v plus a radial r⁴ term (u, v: pixel centre minus photo centre, over half the longer side); gain 1 at the centre',
    log_gain_coefficients: field.logGainCoefficients,
    standard_errors: field.standardErrors.map(round4),
    terms: [...EXPOSURE_FIELD_TERMS],
    fitted_terms: field.tier,
    photo_size_px: [width, height],
    relative_gain_min: round4(gainMin),
    relative_gain_max: round4(gainMax),
    note,
  };
}

const WHITE = SRGB_WHITE_XYZ.map((v) => v * 100);

/** CIELAB of an encoded colour, read as sRGB primaries (a raw camera's channels approximately so). */
function labOf(encoded: readonly number[], encoding: 'srgb' | 'linear'): [number, number, number] {
  const linear = encoded.map((v) => (encoding === 'linear' ? Math.min(1, Math.max(0, v)) : decodeSrgb(Math.min(1, Math.max(0, v)))));
  const m = LINEAR_SRGB_TO_XYZ;
  const xyz = [0, 1, 2].map((r) => 100 * (m[r * 3] * linear[0] + m[r * 3 + 1] * linear[1] + m[r * 3 + 2] * linear[2]));
  return convertXyzToLab(xyz, WHITE);
}

function round4(value: number): number {
  return Math.round(value * 1e4) / 1e4;
}
