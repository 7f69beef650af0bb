/**
 * Reads a thickness grid (nm per pixel) from any of the grid formats Lamella writes or accepts:
 *   - `.npy` (2-D, or 3-D with one channel; any supported numeric type, converted to float32);
 *   - 32-bit float TIFF (single channel);
 *   - 16-bit greyscale PNG or TIFF, where each count means `pngScaleNm` nanometres (required: the
 *     file itself does not say its scale).
 * The format is sniffed from the content, not the suffix. NaN marks pixels without a value.
 */
import sharp from './sharp.js';
import type { Metadata } from 'sharp';
import { InputError } from '../errors.js';
import { readInputFile } from './readInputFile.js';
import { decodeNpy } from './decodeNpy.js';
import { decodeFloatTiffAny, type FloatGrid } from './decodeFloatTiff.js';
import { decodeInputError } from './decodeErrors.js';
import { MAX_PIXELS } from './limits.js';
import { NPY_MAGIC } from './npyFormat.js';
import { uint16View } from './typedView.js';

export interface ReadThicknessGridOptions {
  /** Nanometres per count for 16-bit PNG/TIFF grids (e.g. 0.1 → 65535 counts = 6553.5 nm). */
  pngScaleNm?: number;
}

function isNpy(bytes: Uint8Array): boolean {
  return bytes.length >= 6 && NPY_MAGIC.every((b, i) => bytes[i] === b);
}

function isTiff(bytes: Uint8Array): boolean {
  // A TIFF starts with II*\0 or MM\0*.
  return bytes.length >= 4 && ((bytes[0] === 0x49 && bytes[1] === 0x49 && bytes[2] === 42) || (bytes[0] === 0x4d && bytes[1] === 0x4d && bytes[3] === 42));
}

function fromNpy(bytes: Uint8Array, path: string): FloatGrid {
  const { data, shape } = decodeNpy(bytes, path);
  const ok = shape.length === 2 || (shape.length === 3 && shape[2] === 1);
  if (!ok) throw new InputError(path, `expected a 2-D array (height, width), received shape (${shape.join(', ')})`);
  const [height, width] = shape;
  if (width < 1 || height < 1) throw new InputError(path, `grid is empty, shape (${shape.join(', ')})`);
  return { data: data instanceof Float32Array ? data : Float32Array.from(data), width, height };
}

async function fromScaledImage(bytes: Uint8Array, path: string, pngScaleNm: number | undefined): Promise<FloatGrid> {
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: MAX_PIXELS }).metadata();
  } catch (error) {
    throw decodeInputError(path, error, MAX_PIXELS);
  }
  if (meta.depth !== 'ushort' || meta.channels > 2) {
    throw new InputError(path, `expected a .npy, 32-bit float TIFF or 16-bit greyscale PNG/TIFF grid, received a ${meta.depth === 'ushort' ? 16 : 8}-bit ${meta.channels}-channel ${meta.format}`);
  }
  if (pngScaleNm === undefined) {
    throw new InputError(path, '16-bit image grids need a scale in nm per count (option pngScaleNm); the file does not record one');
  }
  let raw;
  try {
    raw = await sharp(bytes, { limitInputPixels: MAX_PIXELS }).toColourspace('grey16').extractChannel(0).raw({ depth: 'ushort' }).toBuffer({ resolveWithObject: true });
  } catch (error) {
    throw decodeInputError(path, error, MAX_PIXELS);
  }
  const counts = uint16View(raw.data);
  const { width, height, channels } = raw.info;
  const data = new Float32Array(width * height);
  for (let i = 0; i < data.length; i++) data[i] = counts[i * channels] * pngScaleNm;
  return { data, width, height };
}

export async function readThicknessGrid(path: string, options: ReadThicknessGridOptions = {}): Promise<FloatGrid> {
  const { pngScaleNm } = options;
  if (pngScaleNm !== undefined && !(Number.isFinite(pngScaleNm) && pngScaleNm > 0)) {
    throw new RangeError(`pngScaleNm must be a finite number > 0 (nm per count), received ${pngScaleNm}`);
  }
  const bytes = await readInputFile(path);
  if (isNpy(bytes)) return fromNpy(bytes, path);
  if (isTiff(bytes)) {
    try {
      return await decodeFloatTiffAny(bytes, path);
    } catch (error) {
      // Not a float TIFF: it may still be a 16-bit integer grid.
      if (!(error instanceof InputError) || !/SampleFormat|BitsPerSample/.test(error.message)) throw error;
    }
  }
  return fromScaledImage(bytes, path, pngScaleNm);
}
