/**
 * The JSON record written beside every map (`<stem>.json`): settings, fitted photo-formation
 * parameters, limits, statistics, histogram, coverage, thin regions and warnings. Field names
 * are snake_case with units in the name; null means "not available".
 */
import { basename } from 'node:path';
import { type MapOptions, type MapResult, PixelStatus } from './types.js';

export const MAP_RECORD_VERSION = 1;

export function mapResultJson(
  result: MapResult & { readonly extra?: Record<string, unknown> },
  options: MapOptions,
  photoPath: string,
): Record<string, unknown> {
  const counts = { ok: 0, too_dark: 0, too_thick: 0, ambiguous: 0, excluded: 0, saturated: 0 };
  for (let i = 0; i < result.status.length; i++) {
    switch (result.status[i]) {
      case PixelStatus.ok: counts.ok++; break;
      case PixelStatus.dark: counts.too_dark++; break;
      case PixelStatus.tooThick: counts.too_thick++; break;
      case PixelStatus.ambiguous: counts.ambiguous++; break;
      case PixelStatus.excluded: counts.excluded++; break;
      default: counts.saturated++;
    }
  }
  const pixelSizeUm = options.pixelSizeUm ?? null;
  const layers = options.stack.layers.map((layer) => ({
    material: layer.material.name,
    thickness_nm: layer.thicknessNm === 'film' ? 'film' : layer.thicknessNm,
  }));
  return {
    lamella_map_record: MAP_RECORD_VERSION,
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
      angle_deg: (options.angleRad * 180) / Math.PI,
      film_index_scale: options.filmIndexScale ?? 1,
      thin_below_nm: options.thinBelowNm,
      max_thickness_nm: options.maxThicknessNm,
      region: options.region ?? null,
      mask: options.maskPath ?? null,
      anchors: (options.anchors ?? []).map((a) => ({ x: a.x, y: a.y, thickness_nm: a.thicknessNm })),
      pixel_size_um: pixelSizeUm,
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
    thin_regions: result.thinRegions.map((r) => ({
      id: r.id,
      area_px: r.areaPx,
      area_um2: r.areaUm2,
      area_mm2: r.areaUm2 === null ? null : r.areaUm2 / 1e6,
      centroid_px: [round(r.centroidX), round(r.centroidY)],
      min_thickness_nm: r.minThicknessNm,
      bbox_px: r.bbox,
    })),
    details: result.extra ?? {},
    warnings: result.warnings,
    caution:
      'Thickness from a photograph is an estimate, not a substitute for qualified metrology (ellipsometry, reflectometry, profilometry) for release or safety decisions.',
  };
}

function round(value: number): number {
  return Math.round(value * 100) / 100;
}
