/**
 * The JSON record written beside every map (`<stem>.json`): settings, fitted photo-formation
 * parameters, limits, statistics, histogram, coverage, thin regions, the film area, how well the
 * model fits, and warnings. Field names are snake_case with units in the name; null means "not
 * available".
 */
import { basename } from 'node:path';
import { LAMELLA_VERSION } from '../version.js';
import { snakeCaseKeys } from '../io/jsonKeys.js';
import { IDENTITY_RESPONSE, TONE_FAMILY } from '../colour/toneResponse.js';
import { type ExposureField, type FilmAreaSummary, type MapOptions, type MapResult, PixelStatus } from './types.js';

/** Pixels by status (JSON `pixel_counts`); `unknown` only when some code is none of PixelStatus. */
export interface PixelCounts {
  ok: number;
  too_dark: number;
  too_thick: number;
  ambiguous: number;
  excluded: number;
  saturated: number;
  not_film: number;
  undecided: number;
  unknown?: number;
}

export function countPixelStatuses(status: Uint8Array): PixelCounts {
  const byCode = new Float64Array(256);
  for (let i = 0; i < status.length; i++) byCode[status[i]]++;
  const counts: PixelCounts = {
    ok: byCode[PixelStatus.ok],
    too_dark: byCode[PixelStatus.dark],
    too_thick: byCode[PixelStatus.tooThick],
    ambiguous: byCode[PixelStatus.ambiguous],
    excluded: byCode[PixelStatus.excluded],
    saturated: byCode[PixelStatus.saturated],
    not_film: byCode[PixelStatus.notFilm],
    undecided: byCode[PixelStatus.undecided],
  };
  const known = Object.values(counts).reduce((a: number, b) => a + (b ?? 0), 0);
  if (known !== status.length) counts.unknown = status.length - known;
  return counts;
}

/**
 * The film area of a result: the mapper's own summary, or (results made before film areas
 * existed, the single-line path) one derived from the status counts, where every not-film pixel
 * is counted under `not_film_colour` as the reason cannot be told from the status alone.
 */
export function filmAreaOf(result: Pick<MapResult, 'filmArea' | 'status' | 'width' | 'height'>, options: Pick<MapOptions, 'filmArea' | 'pixelSizeUm'>, counts?: PixelCounts): FilmAreaSummary {
  if (result.filmArea) return result.filmArea;
  const c = counts ?? countPixelStatuses(result.status);
  const total = result.width * result.height;
  const areaPx = total - c.excluded - c.not_film - c.undecided - (c.unknown ?? 0);
  const pixelSizeUm = options.pixelSizeUm ?? null;
  return {
    mode: c.not_film + c.undecided > 0 ? (options.filmArea ?? 'auto') : 'whole',
    areaPx,
    fraction: total > 0 ? areaPx / total : 0,
    areaUm2: pixelSizeUm !== null && pixelSizeUm > 0 ? areaPx * pixelSizeUm * pixelSizeUm : null,
    found: areaPx > 0,
    excludedPx: { outside_region: c.excluded, dark_surroundings: 0, not_film_colour: c.not_film, glint: 0, isolated: 0, undecided: c.undecided },
  };
}

/** The JSON `film_area` block. */
export function filmAreaJson(area: FilmAreaSummary): Record<string, unknown> {
  return {
    mode: area.mode,
    area_px: area.areaPx,
    fraction: area.fraction,
    area_um2: area.areaUm2,
    area_mm2: area.areaUm2 === null ? null : area.areaUm2 / 1e6,
    found: area.found,
    excluded_px: {
      outside_region: area.excludedPx.outside_region,
      dark_surroundings: area.excludedPx.dark_surroundings,
      not_film_colour: area.excludedPx.not_film_colour,
      glint: area.excludedPx.glint,
      isolated: area.excludedPx.isolated,
      undecided: area.excludedPx.undecided,
    },
  };
}

export const MAP_RECORD_VERSION = 1;
/** Version of the record's JSON form (schemas/map-record.schema.json). */
export const MAP_SCHEMA_VERSION = 1;

export function mapResultJson(
  result: MapResult & { readonly extra?: Record<string, unknown> },
  options: MapOptions,
  photoPath: string,
): Record<string, unknown> {
  const counts = countPixelStatuses(result.status);
  const filmArea = filmAreaOf(result, options, counts);
  const pixelSizeUm = options.pixelSizeUm ?? null;
  const layers = options.stack.layers.map((layer) => ({
    material: layer.material.name,
    thickness_nm: layer.thicknessNm === 'film' ? 'film' : layer.thicknessNm,
  }));
  return {
    lamella_map_record: MAP_RECORD_VERSION,
    schema_version: MAP_SCHEMA_VERSION,
    lamella_version: LAMELLA_VERSION,
    photo: basename(photoPath),
    width_px: result.width,
    height_px: result.height,
    settings: {
      stack: options.stack.name,
      ambient: options.stack.ambient.name,
      layers,
      substrate: options.stack.substrate.name,
      light: options.light,
      white_balance_light: options.whiteBalanceLight ?? null,
      camera: options.camera ?? 'srgb',
      angle_deg: (options.angleRad * 180) / Math.PI,
      film_index_scale: options.filmIndexScale ?? 1,
      thin_below_nm: options.thinBelowNm,
      max_thickness_nm: options.maxThicknessNm,
      region: options.region ?? null,
      mask: options.maskPath ?? null,
      anchors: (options.anchors ?? []).map((a) => ({ x: a.x, y: a.y, thickness_nm: a.thicknessNm })),
      pixel_size_um: pixelSizeUm,
      film_area: options.filmArea ?? 'auto',
      expect_nm: options.expectNm ? [options.expectNm[0], options.expectNm[1]] : null,
      calibrated: options.exposureFixed ? true : false,
      series_prior: options.prior ? true : false,
    },
    fitted: {
      exposure: result.fitted.exposure,
      white_balance: result.fitted.whiteBalance,
      flare: result.fitted.flare,
      source: options.exposureFixed
        ? 'calibration'
        : 'line' in result
          ? 'brightest and darkest fringes of this photo (single-line light)'
          : 'fitted to this photo (Levenberg–Marquardt)',
    },
    response: responseJson(result.fitted, options),
    limits: {
      dark_limit_nm: result.darkLimitNm,
      // A film whose reflectance vanishes as it thins (a free film) looks black when very thin;
      // one that never looks dark (oxide on silicon) has no dark limit (0 nm).
      dark_meaning:
        result.darkLimitNm > 0
          ? `pixels marked too dark are "thinner than ${round(result.darkLimitNm)} nm or no film"`
          : 'pixels marked too dark are darker than any thickness of this film can look (a shadow, dirt, or no film); they get no thickness',
    },
    statistics: result.stats,
    histogram: { edges_nm: result.histogram.edgesNm, counts: result.histogram.counts },
    pixel_counts: counts,
    film_area: filmAreaJson(filmArea),
    fit_quality: result.fitQuality ? { ...result.fitQuality } : null,
    // The exposure fitted as a smooth field for uneven light (./lightField.ts), null when one exposure was used.
    exposure_field: exposureFieldJson(result.exposureField ?? null),
    light_evenness: result.lightEvenness
      ? { relative_gain_min: round(result.lightEvenness.gainMin), relative_gain_max: round(result.lightEvenness.gainMax), pixels_used: result.lightEvenness.pixelsUsed }
      : null,
    thin_regions: result.thinRegions.map((r) => ({
      id: r.id,
      area_px: r.areaPx,
      area_um2: r.areaUm2,
      area_mm2: r.areaUm2 === null ? null : r.areaUm2 / 1e6,
      centroid_px: [round(r.centroidX), round(r.centroidY)],
      min_thickness_nm: r.minThicknessNm,
      bbox_px: r.bbox,
    })),
    // Free-form details of the mapper, in the records' snake_case like the rest.
    details: snakeCaseKeys(result.extra ?? {}),
    warnings: result.warnings,
    caution:
      'Thickness from a photograph is an estimate, not a substitute for qualified metrology (ellipsometry, reflectometry, profilometry) for release or safety decisions.',
  };
}

/**
 * The JSON `response` block: the camera's response (picture style) the map assumed, with where it
 * came from: fitted to this photo, from the calibration, or the identity (a linear camera, too few
 * colours to fit it, or a series frame holding its predecessor's).
 */
export function responseJson(fitted: MapResult['fitted'], options: Pick<MapOptions, 'exposureFixed'>): Record<string, unknown> {
  const response = fitted.response ?? IDENTITY_RESPONSE;
  const source = fitted.response ? (fitted.responseSource ?? (options.exposureFixed ? 'calibration' : 'photo')) : 'identity';
  return {
    tone: { family: TONE_FAMILY, parameters: { contrast: round4(response.contrast), gamma: round4(response.gamma) } },
    saturation: round4(response.saturation),
    luma_weights: 'BT.601',
    source,
  };
}

function round4(value: number): number {
  return Math.round(value * 1e4) / 1e4;
}

/** The JSON form of a light field (./lightField.ts), shared by map records and calibration files. */
export function exposureFieldJson(field: ExposureField | null): Record<string, unknown> | null {
  if (!field) return null;
  return {
    model: 'log relative gain = quadratic in u, v plus a radial r⁴ term (u, v: pixel centre minus photo centre, over half the longer side)',
    log_gain_coefficients: field.logGainCoefficients.map((c) => Math.round(c * 1e6) / 1e6),
    terms: [...EXPOSURE_FIELD_TERMS],
    relative_gain_min: round(field.gainMin),
    relative_gain_max: round(field.gainMax),
    rounds: field.rounds,
    source: field.source === 'calibration' ? 'calibration file (applied as it is)' : 'fitted to this photo',
  };
}

/** Names of the light field's basis terms, in the order of its coefficients. */
export const EXPOSURE_FIELD_TERMS = ['1', 'u', 'v', 'u²', 'uv', 'v²', 'r⁴'] as const;

function round(value: number): number {
  return Math.round(value * 100) / 100;
}
