/** Writes a RasterImage to PNG, JPEG or TIFF, atomically (./atomicWriteFile.ts). */
import { extname } from 'node:path';
import { atomicWriteFile } from './atomicWriteFile.js';
import { encodeJpeg, encodePng, encodeTiff } from './encodeImage.js';
import type { RasterImage } from './photo.js';

export type ImageFileFormat = 'png' | 'jpeg' | 'tiff';

export interface WriteImageOptions {
  /** JPEG quality 1–100 (default 90); ignored for PNG and TIFF. */
  quality?: number;
  /** Format; by default taken from the file extension (.png, .jpg/.jpeg, .tif/.tiff). */
  format?: ImageFileFormat;
}

const BY_EXTENSION: Record<string, ImageFileFormat> = {
  '.png': 'png',
  '.jpg': 'jpeg',
  '.jpeg': 'jpeg',
  '.tif': 'tiff',
  '.tiff': 'tiff',
};

/** Format for a path from its extension, or undefined. */
export function imageFormatFromPath(path: string): ImageFileFormat | undefined {
  return BY_EXTENSION[extname(path).toLowerCase()];
}

export async function writeImage(path: string, image: RasterImage, options: WriteImageOptions = {}): Promise<void> {
  const format = options.format ?? imageFormatFromPath(path);
  if (format === undefined) {
    throw new RangeError(`cannot tell the image format of ${JSON.stringify(path)}: use .png, .jpg or .tif, or pass options.format`);
  }
  if (format !== 'png' && format !== 'jpeg' && format !== 'tiff') {
    throw new RangeError(`options.format must be 'png', 'jpeg' or 'tiff', received ${JSON.stringify(format)}`);
  }
  const bytes =
    format === 'png' ? await encodePng(image) : format === 'jpeg' ? await encodeJpeg(image, options.quality ?? 90) : await encodeTiff(image);
  await atomicWriteFile(path, bytes);
}
