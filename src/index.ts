/**
 * Lamella's library entry point: the stable API. One call per job — `mapPhoto` (and
 * `writeMapOutputs`), `calibrate`, `runSeries`, `renderPhoto`, `chartRows`/`chartSvg`,
 * `stackSpectrum`/`filmSpectra` — and the building blocks they take (stacks, lights, cameras,
 * photos, grids). Everything else is internal and not reachable from the package (`exports` in
 * package.json).
 */
export * from './api/index.js';
export * from './optics/types.js';
export * from './optics/index.js';
export * from './colour/index.js';
export * from './io/index.js';
export * from './fit/index.js';
export * from './errors.js';
export { mapPhotoFile, writeMapOutputs, mapResultJson, type MappedPhoto, type OutputSelection } from './map/index.js';
export type { MapOptions, MapResult, MapStatistics, ExposureParameters, ThinRegion, PixelStatusCode, MapPhase, FilmAreaSummary } from './map/types.js';
export { PixelStatus } from './map/types.js';
export { readCalibrationFile, type CalibrationRecord, type CalibrateOptions } from './calibrate/index.js';
export { renderMapReport, renderSeriesReport } from './report/index.js';
export type { MapReportInput, SeriesReportInput } from './report/index.js';
export * from './render/index.js';
export { DEFAULT_CHUNK_FRAMES, type SeriesResult, type SeriesProgress, type FrameEvent } from './series/index.js';
export { fitDrainage, DRAINAGE_MODELS, type DrainageFit, type DrainageModel } from './series/index.js';
export { mapMonochromatic, isMonochromaticLight, scheludkoThicknessNm, type MonoMapResult } from './mono/index.js';
export { LAMELLA_VERSION } from './version.js';
