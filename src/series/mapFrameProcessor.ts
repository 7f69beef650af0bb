/**
 * The real frame processor of a series: the thickness mapper (`src/map/mapPhoto.ts`), bound once
 * per worker thread to the series' settings. Workers load this module by URL
 * (`MAP_FRAME_PROCESSOR_URL` in ./mapFrameConfig.ts) and call `createFrameProcessor(config)`.
 */
import { stackFromOptions } from '../optics/stackSettings.js';
import { encodeLinearPhoto, mapDecodedPhoto, mapPhotoFile, readMask, writeMapOutputs, type MappedPhoto } from '../map/mapPhoto.js';
import { thicknessHistogram } from '../map/statistics.js';
import { InputError } from '../errors.js';
import { mapReportInput } from '../map/mapReportInput.js';
import type { MapOptions } from '../map/types.js';
import type { MapFrameConfig } from './mapFrameConfig.js';
import type { FrameProcessor, StoredFrame } from './types.js';
import { scaleRangeOf } from '../map/mapImages.js';
import { inspectionJson, inspectMap } from '../inspect/inspectMap.js';
import { floatPixels, pixelsOfPhoto } from '../map/photoPixels.js';

export function mapOptionsFromConfig(config: MapFrameConfig): MapOptions {
  // The film index scale goes to the mapper only (it scales the film index when building its
  // colour table), not into the stack as well, so it is applied once.
  const { stack, angleRad } = stackFromOptions(config.stackOptions);
  return {
    stack,
    angleRad,
    light: config.light,
    whiteBalanceLight: config.whiteBalanceLight,
    camera: config.camera ?? 'srgb',
    filmIndexScale: config.filmIndexScale ?? undefined,
    thinBelowNm: config.thinBelowNm,
    maxThicknessNm: config.maxThicknessNm,
    exposureFixed: config.exposureFixed,
    exposureFieldFixed: config.exposureFieldFixed ?? null,
    lightField: config.lightField ?? 'auto',
    region: config.region ?? null,
    maskPath: config.maskPath ?? null,
    anchors: config.anchors ?? [],
    pixelSizeUm: config.pixelSizeUm ?? null,
    filmArea: config.filmArea ?? 'auto',
    expectNm: config.expectNm ?? null,
    // A frame's fit does not depend on where its chunk starts (MapOptions.ownFit).
    ownFit: true,
    // Frames are mapped in parallel by the series' workers: one thread per frame.
    threads: 1,
  };
}

/** A frame's stored result as a map result (for its report view and its preview). */
function storedResult(stored: StoredFrame): MappedPhoto {
  const { record } = stored;
  return {
    width: record.width,
    height: record.height,
    thicknessNm: stored.thicknessNm,
    confidence: stored.confidence,
    status: stored.status,
    fitted: record.fitted,
    stats: record.stats,
    histogram: thicknessHistogram(stored.thicknessNm, stored.status, record.stats.min_nm, record.stats.max_nm),
    thinRegions: record.thinRegions,
    darkLimitNm: record.darkLimitNm,
    warnings: record.warnings,
    ...(record.filmArea ? { filmArea: record.filmArea } : {}),
    fitQuality: record.fitQuality ?? null,
    lightEvenness: record.lightEvenness ?? null,
    exposureField: record.exposureField ?? null,
  };
}

/**
 * A frame after one that was mapped with one exposure (no light field carried over): mapped at
 * full size first (MapOptions.fullSizeFirst), its light checked there.
 */
function evenlyLitBefore(prior: Float32Array | null | undefined, previousField: readonly number[] | null | undefined): boolean {
  return prior !== null && prior !== undefined && (previousField === null || previousField === undefined);
}

export async function createFrameProcessor(config: MapFrameConfig): Promise<FrameProcessor> {
  const base = mapOptionsFromConfig(config);
  let mask: { width: number; height: number; pixels: Promise<Uint8Array> } | null = null;
  const maskFor = (width: number, height: number): Promise<Uint8Array> | null => {
    if (!base.maskPath) return null;
    if (!mask || mask.width !== width || mask.height !== height) mask = { width, height, pixels: readMask(base.maskPath, width, height) };
    return mask.pixels;
  };
  // Each frame's inspection (spec share and verdict, uniformity) travels in its record (JSON form).
  const inspected = (result: MappedPhoto): MappedPhoto =>
    config.inspect ? { ...result, inspection: inspectionJson(inspectMap(result, config.inspect, base.pixelSizeUm ?? null)) } : result;
  return {
    mapPhoto: async (photo, name, prior, previousFit, previousField, priorStatus) => {
      const size = photo.width * photo.height;
      if ((prior && prior.length !== size) || (priorStatus && priorStatus.length !== size)) {
        throw new InputError(name, `frame is ${photo.width}×${photo.height}, a different size from the previous frame`);
      }
      const pixels = maskFor(photo.width, photo.height);
      const options = { ...base, prior, fitStart: previousFit ?? null, fieldStart: previousField ?? null, priorStatus: priorStatus ?? null, fullSizeFirst: evenlyLitBefore(prior, previousField) };
      return inspected(mapDecodedPhoto(photo, options, pixels ? await pixels : null, name));
    },
    map: async (framePath, prior, previousFit, previousField, priorStatus) =>
      inspected(await mapPhotoFile(
        framePath,
        { ...base, prior, fitStart: previousFit ?? null, fieldStart: previousField ?? null, priorStatus: priorStatus ?? null, fullSizeFirst: evenlyLitBefore(prior, previousField) },
        { allowDamaged: config.allowDamaged === true },
      )),
    writePreviews: async (result, framePath, dir, stem) => {
      const range = config.rangeNm ?? null;
      await writeMapOutputs(result, framePath, dir, stem, { images: true, json: false, npy: false, tiff: false, rangeNm: range }, base);
      const used = range ?? [scaleRangeOf(result).minNm, scaleRangeOf(result).maxNm];
      return { rangeNm: [used[0], used[1]] as [number, number] };
    },
    mapReportInput: (result, framePath) => mapReportInput(result as MappedPhoto, base, framePath),
    storedReportInput: (stored, photo, framePath) => {
      // The photo as the mapper saw it: a linear camera's values sRGB-encoded (mapPhoto.ts).
      const photoPixels = base.camera && base.camera !== 'srgb' ? floatPixels(encodeLinearPhoto(photo.rgb)) : pixelsOfPhoto(photo);
      return mapReportInput({ ...storedResult(stored), photoPixels }, { ...base, prior: null }, framePath);
    },
    renderStoredPreview: async (stored, framePath, dir, stem, rangeNm) => {
      await writeMapOutputs(storedResult(stored), framePath, dir, stem, { images: true, json: false, npy: false, tiff: false, rangeNm }, base);
    },
  };
}
