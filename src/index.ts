/** Library entry point: re-exports the public API of each engine. */
export * from './optics/types.js';
export * from './optics/index.js';
export * from './colour/index.js';
export * from './io/index.js';
export * from './fit/index.js';
export { renderMapReport, renderSeriesReport, makeReportGrid } from './report/index.js';
export type { MapReportInput, SeriesReportInput, ReportGrid, ThinRegionRow, SeriesFrameRow, DrainageFitSummary } from './report/index.js';
export * from './render/index.js';
export * from './series/index.js';
export { mapMonochromatic, mapLineIntensity, isMonochromaticLight, scheludkoThicknessNm, airyFreeFilmReflectance, freeFilmPeakReflectance, stackLineTable, type MonoMapResult, type LineScaleReport } from './mono/index.js';
