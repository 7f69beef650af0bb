/**
 * The real frame processor of a series: the thickness mapper (`src/map/mapPhoto.ts`), bound once
 * per worker thread to the series' settings. Workers load this module by URL
 * (`MAP_FRAME_PROCESSOR_URL` in ./mapFrameConfig.ts) and call `createFrameProcessor(config)`.
 */
import { stackFromOptions } from '../optics/stackSettings.js';
import { mapPhotoFile, writeMapOutputs, type MappedPhoto } from '../map/mapPhoto.js';
import { mapReportInput } from '../map/mapReportInput.js';
import type { MapOptions } from '../map/types.js';
import type { MapFrameConfig } from './mapFrameConfig.js';
import type { FrameProcessor } from './types.js';

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
    region: config.region ?? null,
    maskPath: config.maskPath ?? null,
    anchors: config.anchors ?? [],
    pixelSizeUm: config.pixelSizeUm ?? null,
    filmArea: config.filmArea ?? 'auto',
    expectNm: config.expectNm ?? null,
    // Frames are mapped in parallel by the series' workers: one thread per frame.
    threads: 1,
  };
}

export async function createFrameProcessor(config: MapFrameConfig): Promise<FrameProcessor> {
  const base = mapOptionsFromConfig(config);
  return {
    map: (framePath, prior, previousFit, priorStatus) =>
      mapPhotoFile(framePath, { ...base, prior, fitStart: previousFit ?? null, priorStatus: priorStatus ?? null }, { allowDamaged: config.allowDamaged === true }),
    writePreviews: (result, framePath, dir, stem) =>
      writeMapOutputs(result, framePath, dir, stem, { images: true, json: false, npy: false, tiff: false }, base),
    mapReportInput: (result, framePath) => mapReportInput(result as MappedPhoto, base, framePath),
  };
}
