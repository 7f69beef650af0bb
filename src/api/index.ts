// The library's one-call jobs (what the CLI's commands do, results in memory).
export { mapPhoto, type MapPhotoOptions } from './mapPhoto.js';
export { calibrate, type CalibratePhotoOptions } from './calibrate.js';
export { photoFromInput, type PhotoInput, type PhotoInputOptions } from './photoInput.js';
export { runSeries, seriesJobOptions, type RunSeriesOptions, type RunSeriesHooks, type RunSeriesResult, type StackSettings } from './runSeries.js';
export { mapPhotos, type MapPhotosOptions, type MapPhotosHooks, type MapPhotosResult } from './mapPhotos.js';
export { chart, type ChartJobOptions, type ChartResult, type ChartFormat } from './chart.js';
export { spectrum, type SpectrumJobOptions, type SpectrumResult } from './spectrum.js';
export { render, type RenderJobOptions, type ThicknessMapInput } from './render.js';
export { MAP_OUTPUT_FILES, MAP_OUTPUT_NAMES, type MapOutputName } from '../map/outputNames.js';
export { compareMaps, type CompareMapsOptions, type CompareMapsResult } from './compareMaps.js';
export { flowFromSeries, type FlowOptions, type FlowCallbacks, type FlowResult, type FlowProgress, type FlowPairRecord, type FlowSummary, type PatchRow } from './flowFromSeries.js';
