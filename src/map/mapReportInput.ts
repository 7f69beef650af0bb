/**
 * Builds the report's input record for one map: downsampled pictures (≤ 1,200 px on the long
 * side; the photo with the film area's outline), the embedded grid (≤ 250k cells, each a value
 * of the map files at a known pixel, with its status), the film area, the fit quality and the
 * tables.
 */
import { basename } from 'node:path';
import { encodePng } from '../io/encodeImage.js';
import { makeReportGrid } from '../report/makeReportGrid.js';
import type { MapReportInput, ReportLight } from '../report/types.js';
import { colourScaleStops } from './colourScale.js';
import { mapRaster, paintFilmOutline, type ScaleRange, scaleRangeOf, withMaskOutline } from './mapImages.js';
import type { MappedPhoto } from './mapPhoto.js';
import { filmAreaOf, mapResultJson } from './mapResultJson.js';
import type { MapOptions } from './types.js';
import { relativeGainAt } from './lightEvenness.js';
import { valueAt } from './photoPixels.js';

const MAX_PICTURE_SIDE = 1200;

export async function mapReportInput(
  result: MappedPhoto,
  options: MapOptions,
  photoPath: string,
  record: Record<string, unknown> = mapResultJson(result, options, photoPath),
  /** Pixels whose outline the map picture draws (out of spec, src/inspect), or null. */
  outline: Uint8Array | null = null,
): Promise<MapReportInput> {
  const { width, height } = result;
  const range = scaleRangeOf(result);
  const step = Math.max(1, Math.ceil(Math.max(width, height) / MAX_PICTURE_SIDE));
  const small = sampledPictures(result, range, step, outline);
  // The encoders run in the codec's threads while the grid is cut here.
  const pictures = Promise.all([
    encodePng({ data: small.photo, width: small.width, height: small.height, channels: 3 }),
    encodePng({ data: small.map, width: small.width, height: small.height, channels: 3 }),
  ]);
  const grid = makeReportGrid({ width, height, thicknessNm: result.thicknessNm, confidence: result.confidence, status: result.status });
  const filmArea = filmAreaOf(result, options);
  const [photoPng, mapPng] = await pictures;
  const notes: string[] = [];
  if (step > 1) notes.push(`pictures shown at 1/${step} scale`);
  return {
    title: `Thickness map of ${basename(photoPath)}`,
    generatedAt: new Date().toISOString(),
    photoPng,
    mapPng,
    colourBar: { minNm: range.minNm, maxNm: range.maxNm, stops: colourScaleStops(range.minNm, range.maxNm) },
    grid,
    thinBelowNm: options.thinBelowNm,
    stats: { ...result.stats },
    histogram: result.histogram,
    thinRegions: result.thinRegions.map((r) => ({
      id: r.id,
      areaPx: r.areaPx,
      ...(r.areaUm2 === null ? {} : { areaUm2: r.areaUm2 }),
      centroidX: r.centroidX,
      centroidY: r.centroidY,
      minThicknessNm: r.minThicknessNm,
      bbox: [r.bbox[0], r.bbox[1], r.bbox[2], r.bbox[3]],
    })),
    settings: record.settings as Record<string, unknown>,
    fitted: { ...(record.fitted as Record<string, unknown>), ...(record.limits as Record<string, unknown>) },
    calibration: null,
    warnings: [...result.warnings],
    filmArea: { ...filmArea, excludedPx: { ...filmArea.excludedPx } },
    fitQuality: result.fitQuality ? { ...result.fitQuality } : null,
    light: reportLightOf(result),
    inspection: (record.inspection as Record<string, unknown> | undefined) ?? null,
    ...(notes.length > 0 ? { downsampleNote: notes.join('; ') } : {}),
  };
}

/** The light field sampled at the centres of a grid of about 24 cells on the photo's longer side. */
function reportLightOf(result: MappedPhoto): ReportLight {
  const field = result.exposureField ?? null;
  const evenness = result.lightEvenness ? { gainMin: result.lightEvenness.gainMin, gainMax: result.lightEvenness.gainMax } : null;
  if (!field) return { field: null, evenness };
  const { width, height } = result;
  const cellPx = Math.max(width, height) / 24;
  const gridWidth = Math.max(1, Math.round(width / cellPx));
  const gridHeight = Math.max(1, Math.round(height / cellPx));
  const relativeGain: number[] = [];
  for (let gy = 0; gy < gridHeight; gy++) {
    for (let gx = 0; gx < gridWidth; gx++) {
      const x = ((gx + 0.5) * width) / gridWidth - 0.5;
      const y = ((gy + 0.5) * height) / gridHeight - 0.5;
      relativeGain.push(relativeGainAt(field.logGainCoefficients, width, height, x, y));
    }
  }
  return { field: { gridWidth, gridHeight, relativeGain, gainMin: field.gainMin, gainMax: field.gainMax, rounds: field.rounds, source: field.source }, evenness };
}

/**
 * The photo and the map at 1/step scale, each picture pixel the top-left pixel of its block
 * (as the embedded grid), computed only at the sampled pixels; the photo with the film area's
 * outline (dashed cyan and black, as on the flags image).
 */
function sampledPictures(result: MappedPhoto, range: ScaleRange, step: number, outline: Uint8Array | null): { photo: Uint8Array; map: Uint8Array; width: number; height: number } {
  const { width, height } = result;
  const w = Math.ceil(width / step);
  const h = Math.ceil(height / step);
  const picked = new Int32Array(w * h);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) picked[y * w + x] = y * step * width + x * step;
  const photo = new Uint8Array(w * h * 3);
  const pixels = result.photoPixels;
  if (pixels) {
    for (let k = 0; k < picked.length; k++) {
      const src = picked[k] * 3;
      photo[k * 3] = Math.round(valueAt(pixels, src) * 255);
      photo[k * 3 + 1] = Math.round(valueAt(pixels, src + 1) * 255);
      photo[k * 3 + 2] = Math.round(valueAt(pixels, src + 2) * 255);
    }
  }
  const status = new Uint8Array(picked.length);
  for (let k = 0; k < picked.length; k++) status[k] = result.status[picked[k]];
  const lineWidth = Math.max(1, Math.round(Math.min(w, h) / 400));
  paintFilmOutline(photo, status, w, h, lineWidth, Math.max(6, lineWidth * 6));
  return { photo, map: withMaskOutline(mapRaster(result, range, picked, w), outline, picked, w, h), width: w, height: h };
}
