/**
 * Lamella's library entry point: the stable API. One call per job — `mapPhoto`/`mapPhotos` (and
 * `writeMapOutputs`), `calibrate`, `runSeries`, `flowFromSeries`, `chart`, `spectrum`, `render` — and the building
 * blocks they take or return (stacks, materials, lights, cameras, photos, thickness grids, colour
 * conversions). Everything else is internal and not reachable from the package (`exports` in
 * package.json): the names below are the whole public surface, chosen one by one.
 */

// Jobs: one call each, as the CLI's commands (results in memory; the library never prints).
export { mapPhoto, type MapPhotoOptions } from './api/mapPhoto.js';
export { mapPhotos, type MapPhotosOptions, type MapPhotosHooks, type MapPhotosResult } from './api/mapPhotos.js';
export { compareMaps, type CompareMapsOptions, type CompareMapsResult } from './api/compareMaps.js';
export { parseSpec, parsePassRule, type ThicknessSpec, type PassRule } from './inspect/spec.js';
export type { InspectOptions } from './inspect/inspectMap.js';
export { calibrate, type CalibratePhotoOptions } from './api/calibrate.js';
export { runSeries, type RunSeriesOptions, type RunSeriesHooks, type RunSeriesResult, type StackSettings } from './api/runSeries.js';
export { flowFromSeries, type FlowOptions, type FlowCallbacks, type FlowResult, type FlowProgress, type FlowPairRecord, type FlowSummary, type PatchRow } from './api/flowFromSeries.js';
export { chart, type ChartJobOptions, type ChartResult, type ChartFormat } from './api/chart.js';
export { spectrum, type SpectrumJobOptions, type SpectrumResult } from './api/spectrum.js';
export { render, type RenderJobOptions, type ThicknessMapInput } from './api/render.js';
export { photoFromInput, type PhotoInput, type PhotoInputOptions } from './api/photoInput.js';

// Map results and their files.
export { writeMapOutputs, mapResultJson, type MappedPhoto, type OutputSelection } from './map/index.js';
export { MAP_OUTPUT_FILES, MAP_OUTPUT_NAMES, type MapOutputName } from './map/outputNames.js';
// A map's photo (`MappedPhoto.photoPixels`): 8-bit codes or floats, read with `valueAt`.
export { floatPixels, pixelFloats, valueAt, type PhotoPixels } from './map/photoPixels.js';
export type { MapOptions, MapResult, MapStatistics, ExposureParameters, ThinRegion, PixelStatusCode, MapPhase, FilmAreaSummary, Anchor, FilmAreaMode } from './map/types.js';
export { PixelStatus } from './map/types.js';
export { readCalibrationFile, type CalibrationRecord, type CalibrateOptions } from './calibrate/index.js';
export { renderMapReport, renderSeriesReport, type MapReportInput, type SeriesReportInput } from './report/index.js';
export { DEFAULT_CHUNK_FRAMES, type SeriesResult, type SeriesProgress, type FrameEvent } from './series/index.js';
export { fitDrainage, DRAINAGE_MODELS, type DrainageFit, type DrainageModel } from './series/index.js';
export { mapMonochromatic, isMonochromaticLight, scheludkoThicknessNm, type MonoMapResult } from './mono/index.js';

// Film stacks and materials (optics).
export type { ComplexIndex, Material, Polarisation, Layer, Stack } from './optics/types.js';
export { resolveStack, resolveFilmMaterial, type StackOverrides } from './optics/resolveStack.js';
export { stackPresets, listStackPresetNames, isStackPresetName, presetStack, type StackPresetName } from './optics/presets.js';
export { loadStackFile } from './optics/stackFile.js';
export { getMaterial, listMaterialNames, isMaterialName, materialLibrary } from './optics/materialLibrary.js';
export { loadMaterialFile } from './optics/materialFile.js';
export { makeMaterial, constantMaterial, scaleMaterialIndex, type MaterialOptions, type MaterialParts } from './optics/material.js';
export { sellmeier, type SellmeierCoefficients } from './optics/dispersion/sellmeier.js';
export { cauchy, type CauchyCoefficients } from './optics/dispersion/cauchy.js';
export { glycerolWaterMaterial } from './optics/glycerolWater.js';
export { parseNkCsv, materialFromNkTable, type NkTable } from './optics/materialTable.js';
export { filmSpectra, type FilmSpectraGrid, type FilmSpectraResult } from './optics/filmSpectra.js';
export { stackSpectrum, type StackSpectrum } from './optics/stackSpectrum.js';
export { airyFilm } from './optics/airyFilm.js';
export { wavelengthGrid } from './optics/wavelengthGrid.js';

// Lights, observers and cameras (colour).
export { type Light } from './colour/light.js';
export { resolveLight, blackbodyLight, lineLight, LIGHT_NAMES } from './colour/lights.js';
export { readSpdFile } from './colour/readSpdFile.js';
export { colourMatchingFunctions, OBSERVER_NAMES, type ObserverName } from './colour/observers.js';
export { buildCamera, type Camera, type CameraOptions } from './colour/camera.js';
export { cameraFromSpec, CAMERA_MODES, type CameraSpec } from './colour/cameraSpec.js';
export { readCameraSensitivities, type CameraSensitivities } from './colour/readCameraSensitivities.js';
export { xyzWeights, whitePointXyz } from './colour/xyzWeights.js';

// Colour conversions and differences.
export { convertXyzToLab, convertLabToXyz, convertLabToLch } from './colour/lab.js';
export { convertXyzToXyy, convertXyyToXyz } from './colour/xyy.js';
export { encodeSrgb, decodeSrgb, linearToSrgb8, linearToSrgb16, srgb8ToLinear, srgb16ToLinear, convertXyzToLinearSrgb, convertLinearSrgbToXyz, hexOfSrgb8, SRGB_WHITE_XYZ } from './colour/srgb.js';
export { deltaE2000, deltaE76, createDeltaE2000, type DeltaE2000Weights } from './colour/deltaE.js';
export { chromaticAdaptationMatrix, type AdaptationMethod } from './colour/chromaticAdaptation.js';

// Charts and synthetic photos.
export { chartTable, DEFAULT_CHART_RANGE, type ChartOptions, type ChartTable } from './render/chartTable.js';
export { chartSvg } from './render/chartSvg.js';
export { renderPhoto, type RenderOptions, type RenderResult } from './render/renderPhoto.js';

// Photos and grids (files).
export type { Photo, PhotoMetadata, PhotoTime, ReadPhotoOptions, RasterImage } from './io/photo.js';
export { readPhoto, readPhotoBytes } from './io/readPhoto.js';
export { readPhotoMetadata } from './io/readPhotoMetadata.js';
export { writeImage, type ImageFileFormat, type WriteImageOptions } from './io/writeImage.js';
export { readNpy, writeNpy, type NpyArray } from './io/index.js';
export { encodeNpy, decodeNpy } from './io/index.js';
export { readFloatTiff, writeFloatTiff, encodeFloatTiff, decodeFloatTiff, type FloatGrid } from './io/index.js';
export { readThicknessGrid, type ReadThicknessGridOptions } from './io/readThicknessGrid.js';
export { MAX_PIXELS } from './io/limits.js';

// Least squares (weighted, bounded, with standard errors): the fit behind calibration and drainage.
export { fitLeastSquares, type LeastSquaresProblem, type LeastSquaresResult } from './fit/index.js';

// Errors and exit codes.
export { UsageError, InputError, EXIT_OK, EXIT_FINDING, EXIT_USAGE, EXIT_INPUT } from './errors.js';
export { DataFileError } from './optics/dataFileError.js';
export { CsvFormatError } from './colour/readNumericCsv.js';
export { LAMELLA_VERSION } from './version.js';
