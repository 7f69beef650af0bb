/** Public API of the thickness mapper (re-exports only). */
export * from './types.js';
export { mapPhotoFile, mapDecodedPhoto, writeMapOutputs, colourTableFor, lineOfLight, readMask, type MappedPhoto, type OutputSelection } from './mapPhoto.js';
export { mapPixels, type MapPixelsInput, type MapPixelsResult } from './mapPixels.js';
export { mapResultJson, MAP_RECORD_VERSION } from './mapResultJson.js';
export { mapReportInput } from './mapReportInput.js';
export { buildColourTable, orderPeriodNm, type BuiltColourTable, type ColourTableRequest } from './buildColourTable.js';
export { computeMapStatistics, percentileSorted, thicknessHistogram } from './statistics.js';
export { findThinRegions, type ThinRegionResult } from './thinRegions.js';
export { colourScaleBytes, colourScaleStops } from './colourScale.js';
export { fitPhotoFormation, type PhotoFormationFit, type PhotoFormationOptions } from './fitPhotoFormation.js';
export { resolveOrders, type OrderOptions, type OrderResult } from './resolveOrders.js';
