/**
 * Builds the report's input record for one map: downsampled pictures (≤ 1,200 px on the long
 * side), the embedded grid (≤ 250k cells, each a value of the map files at a known pixel), and
 * the tables.
 */
import { basename } from 'node:path';
import { encodePng } from '../io/encodeImage.js';
import { makeReportGrid } from '../report/makeReportGrid.js';
import type { MapReportInput } from '../report/types.js';
import { colourScaleStops } from './colourScale.js';
import { mapRaster, scaleRangeOf } from './mapImages.js';
import type { MappedPhoto } from './mapPhoto.js';
import { mapResultJson } from './mapResultJson.js';
import type { MapOptions } from './types.js';

const MAX_PICTURE_SIDE = 1200;

export async function mapReportInput(
  result: MappedPhoto,
  options: MapOptions,
  photoPath: string,
  record: Record<string, unknown> = mapResultJson(result, options, photoPath),
): Promise<MapReportInput> {
  const { width, height } = result;
  const range = scaleRangeOf(result);
  const step = Math.max(1, Math.ceil(Math.max(width, height) / MAX_PICTURE_SIDE));
  const photoBytes = new Uint8Array(width * height * 3);
  if (result.photoRgb) for (let i = 0; i < photoBytes.length; i++) photoBytes[i] = Math.round(result.photoRgb[i] * 255);
  const photoSmall = downsample(photoBytes, width, height, step);
  const mapSmall = downsample(mapRaster(result, range), width, height, step);
  const grid = makeReportGrid({ width, height, thicknessNm: result.thicknessNm, confidence: result.confidence });
  const notes: string[] = [];
  if (step > 1) notes.push(`pictures shown at 1/${step} scale`);
  return {
    title: `Thickness map of ${basename(photoPath)}`,
    generatedAt: new Date().toISOString(),
    photoPng: await encodePng({ data: photoSmall.data, width: photoSmall.width, height: photoSmall.height, channels: 3 }),
    mapPng: await encodePng({ data: mapSmall.data, width: mapSmall.width, height: mapSmall.height, channels: 3 }),
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
    ...(notes.length > 0 ? { downsampleNote: notes.join('; ') } : {}),
  };
}

function downsample(bytes: Uint8Array, width: number, height: number, step: number): { data: Uint8Array; width: number; height: number } {
  if (step === 1) return { data: bytes, width, height };
  const w = Math.ceil(width / step);
  const h = Math.ceil(height / step);
  const out = new Uint8Array(w * h * 3);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const src = (y * step * width + x * step) * 3;
      const dst = (y * w + x) * 3;
      out[dst] = bytes[src];
      out[dst + 1] = bytes[src + 1];
      out[dst + 2] = bytes[src + 2];
    }
  }
  return { data: out, width: w, height: h };
}
