/**
 * Reads a photo's header only (size after EXIF orientation, format, bit depth, capture time),
 * without decoding pixels: cheap enough to plan a series of thousands of frames.
 */
import sharp from './sharp.js';
import type { Metadata } from 'sharp';
import { MAX_PIXELS } from './limits.js';
import { parseExifTime } from './exifTime.js';
import { checkInputFile } from './readInputFile.js';
import { decodeInputError } from './decodeErrors.js';
import type { PhotoMetadata } from './photo.js';

export async function readPhotoMetadata(path: string): Promise<PhotoMetadata> {
  await checkInputFile(path);
  let meta: Metadata;
  try {
    meta = await sharp(path, { limitInputPixels: false }).metadata();
  } catch (error) {
    throw decodeInputError(path, error, MAX_PIXELS);
  }
  const orientation = typeof meta.orientation === 'number' && meta.orientation >= 1 && meta.orientation <= 8 ? meta.orientation : 1;
  const upright = meta.autoOrient ?? { width: meta.width, height: meta.height };
  return {
    width: upright.width,
    height: upright.height,
    format: String(meta.format),
    bitDepth: meta.depth === 'ushort' ? 16 : 8,
    channels: meta.channels,
    hasAlpha: meta.hasAlpha,
    orientation,
    exif: parseExifTime(meta.exif),
    pages: typeof meta.pages === 'number' && meta.pages > 1 ? meta.pages : 1,
    pageHeight: meta.pageHeight ?? upright.height,
  };
}
