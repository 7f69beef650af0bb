/**
 * Encoders from a plain RasterImage to PNG, JPEG or TIFF bytes. 16-bit data stays 16-bit in PNG
 * and TIFF; JPEG is 8-bit only. Colour images are written as sRGB, one/two channels as grey.
 */
import sharp from './sharp.js';
import type { Sharp } from 'sharp';
import { checkRasterImage } from './checkRasterImage.js';
import type { RasterImage } from './photo.js';
import { setPngPixelSize } from './pngPixelSize.js';

function pipeline(image: RasterImage): Sharp {
  checkRasterImage(image);
  const is16 = image.data instanceof Uint16Array;
  const grey = image.channels <= 2;
  const input = is16 ? new Uint16Array(image.data) : new Uint8Array(image.data);
  return sharp(input, { raw: { width: image.width, height: image.height, channels: image.channels } }).toColourspace(
    grey ? (is16 ? 'grey16' : 'b-w') : is16 ? 'rgb16' : 'srgb',
  );
}

/** Lossless PNG (8- or 16-bit per the data type); pHYs from `pixelSizeUm`, none when it is not given (./pngPixelSize.ts). */
export async function encodePng(image: RasterImage, pixelSizeUm: number | null = null): Promise<Buffer> {
  return setPngPixelSize(await pipeline(image).png({ compressionLevel: 6, adaptiveFiltering: false }).toBuffer(), pixelSizeUm);
}

/** Baseline JPEG, 8-bit data only. `quality` 1–100 (default 90), 4:4:4 chroma to keep colours sharp. */
export async function encodeJpeg(image: RasterImage, quality = 90): Promise<Buffer> {
  checkRasterImage(image);
  if (!(image.data instanceof Uint8Array)) {
    throw new TypeError('JPEG is 8-bit only: image.data must be a Uint8Array, received Uint16Array (write PNG or TIFF for 16-bit)');
  }
  if (!Number.isInteger(quality) || quality < 1 || quality > 100) {
    throw new RangeError(`quality must be an integer from 1 to 100, received ${quality}`);
  }
  return pipeline(image).jpeg({ quality, chromaSubsampling: '4:4:4' }).toBuffer();
}

/** Lossless TIFF (deflate), 8- or 16-bit per the data type. */
export async function encodeTiff(image: RasterImage): Promise<Buffer> {
  return pipeline(image).tiff({ compression: 'deflate', predictor: 'horizontal' }).toBuffer();
}

/** A multi-page TIFF (an image stack, deflate), one page per image; all pages of one size, type and channel count. */
export async function encodeTiffStack(pages: readonly RasterImage[]): Promise<Buffer> {
  if (pages.length === 0) throw new RangeError('a stack needs at least one page');
  for (const page of pages) checkRasterImage(page);
  const [first] = pages;
  const is16 = first.data instanceof Uint16Array;
  if (pages.some((p) => p.width !== first.width || p.height !== first.height || p.channels !== first.channels || (p.data instanceof Uint16Array) !== is16)) {
    throw new RangeError('every page of a stack must have the size, channels and sample type of the first');
  }
  const perPage = first.width * first.height * first.channels;
  const joined = is16 ? new Uint16Array(perPage * pages.length) : new Uint8Array(perPage * pages.length);
  pages.forEach((p, k) => joined.set(p.data, k * perPage));
  const grey = first.channels <= 2;
  return sharp(joined, { raw: { width: first.width, height: first.height * pages.length, channels: first.channels, pageHeight: first.height } })
    .toColourspace(grey ? (is16 ? 'grey16' : 'b-w') : is16 ? 'rgb16' : 'srgb')
    .tiff({ compression: 'deflate', predictor: 'horizontal' })
    .toBuffer();
}
