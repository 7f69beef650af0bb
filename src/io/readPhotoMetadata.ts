/**
 * Reads a photo's header only (size after EXIF orientation, format, bit depth, capture time),
 * without decoding pixels: cheap enough to plan a series of thousands of frames.
 */
import { stat } from 'node:fs/promises';
import sharp, { type Metadata } from 'sharp';
import { InputError } from '../cli/errors.js';
import { MAX_PIXELS } from './limits.js';
import { parseExifTime } from './exifTime.js';
import { fileSystemInputError } from './readInputFile.js';
import { decodeInputError } from './decodeErrors.js';
import type { PhotoMetadata } from './photo.js';

export async function readPhotoMetadata(path: string): Promise<PhotoMetadata> {
  if (typeof path !== 'string' || path.length === 0) {
    throw new TypeError(`path must be a non-empty string, received ${JSON.stringify(path)}`);
  }
  let info;
  try {
    info = await stat(path);
  } catch (error) {
    throw fileSystemInputError(path, error);
  }
  if (info.isDirectory()) throw new InputError(path, 'is a folder, expected a file');
  if (info.size === 0) throw new InputError(path, 'file is empty (0 bytes)');
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
  };
}
