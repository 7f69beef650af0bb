/** The self-contained HTML report: contract types, the two renderers and the SVG chart helpers. */
export type {
  DrainageFitSummary, MapReportInput, ReportGrid, SeriesFrameRow, SeriesReportInput, ThinRegionRow,
} from './types.js';
export { renderMapReport, checkMapReportInput } from './renderMapReport.js';
export { renderSeriesReport, checkSeriesReportInput } from './renderSeriesReport.js';
export { renderLineChart, type LineChartSpec, type LineSeries, type ReferenceLine, type ReferenceBand } from './svgChart.js';
export { renderHistogram, type HistogramSpec } from './svgHistogram.js';
export { niceTicks, niceTickStep, niceDomain, type TickSpec } from './niceTicks.js';
export { escapeHtml } from './escapeHtml.js';
export { encodeFloat32Base64, decodeFloat32Base64 } from './encodeFloat32Base64.js';
export { makeReportGrid, defaultMaxReportCells, type FullResolutionMap } from './makeReportGrid.js';
