/** Image and grid I/O: the only module that touches the image codec. */
export * from './photo.js';
export { MAX_PIXELS, MAP_MAX_PIXELS } from './limits.js';
export { readPhoto, readPhotoBytes } from './readPhoto.js';
export { readPhotoMetadata } from './readPhotoMetadata.js';
export { parseExifTime } from './exifTime.js';
export { writeImage, imageFormatFromPath, type ImageFileFormat, type WriteImageOptions } from './writeImage.js';
export { encodePng, encodeJpeg, encodeTiff } from './encodeImage.js';
export { rasteriseSvg } from './rasteriseSvg.js';
export { encodeNpy, writeNpy } from './encodeNpy.js';
export { decodeNpy, readNpy, type NpyArray } from './decodeNpy.js';
export type { NpyData } from './npyFormat.js';
export { encodeFloatTiff, writeFloatTiff } from './encodeFloatTiff.js';
export { decodeFloatTiff, decodeFloatTiffAny, readFloatTiff, type FloatGrid } from './decodeFloatTiff.js';
export { readThicknessGrid, type ReadThicknessGridOptions } from './readThicknessGrid.js';
export { atomicWriteFile } from './atomicWriteFile.js';
export { ensureOutputDir, assertNoInputOverwritten, type EnsureOutputDirOptions } from './ensureOutputDir.js';
export { composeImagePng, type ComposeRequest } from './composeImage.js';
