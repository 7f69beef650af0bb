/**
 * Reader for single-channel 32-bit floating-point TIFF files, uncompressed, in strips, either
 * byte order (TIFF Revision 6.0, Adobe 1992, Sections 2, 3 and 19; see ./encodeFloatTiff.ts).
 * This covers our own output and the usual "float grid" exports of image tools; compressed or
 * tiled float TIFFs are handed to the image codec by `decodeFloatTiffAny`/`readFloatTiff`.
 */
import sharp from './sharp.js';
import { InputError } from '../errors.js';
import { readInputFile } from './readInputFile.js';
import { decodeInputError } from './decodeErrors.js';
import { MAX_PIXELS } from './limits.js';
import { float32View } from './typedView.js';

export interface FloatGrid {
  data: Float32Array;
  width: number;
  height: number;
}

const TYPE_SIZE: Record<number, number> = { 1: 1, 3: 2, 4: 4, 5: 8, 16: 8 };

export function decodeFloatTiff(bytes: Uint8Array, source = '<tiff>'): FloatGrid {
  const fail = (message: string): never => {
    throw new InputError(source, message);
  };
  if (bytes.length < 8) fail('file too short to be a TIFF');
  const order = String.fromCharCode(bytes[0], bytes[1]);
  if (order !== 'II' && order !== 'MM') fail('not a TIFF file (byte-order mark II/MM missing)');
  const le = order === 'II';
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (view.getUint16(2, le) !== 42) fail('not a classic TIFF file (magic 42 missing; BigTIFF is not supported)');
  const ifd = view.getUint32(4, le);
  if (ifd + 2 > bytes.length) fail('truncated TIFF (first IFD past end of file)');
  const count = view.getUint16(ifd, le);
  if (ifd + 2 + count * 12 > bytes.length) fail('truncated TIFF (IFD past end of file)');
  const tags = new Map<number, number[]>();
  for (let i = 0; i < count; i++) {
    const at = ifd + 2 + i * 12;
    const tag = view.getUint16(at, le);
    const type = view.getUint16(at + 2, le);
    const n = view.getUint32(at + 4, le);
    const size = TYPE_SIZE[type];
    if (size === undefined || (type !== 3 && type !== 4)) continue; // only SHORT/LONG tags are needed here
    const start = n * size <= 4 ? at + 8 : view.getUint32(at + 8, le);
    if (start + n * size > bytes.length) fail(`truncated TIFF (values of tag ${tag} past end of file)`);
    const values: number[] = [];
    for (let k = 0; k < n; k++) values.push(type === 3 ? view.getUint16(start + k * 2, le) : view.getUint32(start + k * 4, le));
    tags.set(tag, values);
  }
  const one = (tag: number, fallback?: number): number => {
    const v = tags.get(tag)?.[0] ?? fallback;
    if (v === undefined) fail(`TIFF lacks required tag ${tag}`);
    return v as number;
  };
  const width = one(256);
  const height = one(257);
  const bits = one(258, 1);
  const compression = one(259, 1);
  const samples = one(277, 1);
  const sampleFormat = one(339, 1);
  if (sampleFormat !== 3 || bits !== 32) fail(`expected a 32-bit floating-point TIFF (SampleFormat 3, BitsPerSample 32), received SampleFormat ${sampleFormat}, BitsPerSample ${bits}`);
  if (samples !== 1) fail(`expected one channel, received SamplesPerPixel ${samples}`);
  if (compression !== 1) fail(`compressed float TIFF (Compression ${compression}) is not supported; save it uncompressed`);
  if (tags.has(322)) fail('tiled TIFF is not supported; save it in strips');
  const offsets = tags.get(273) ?? fail('TIFF lacks StripOffsets');
  const counts = tags.get(279) ?? fail('TIFF lacks StripByteCounts');
  const data = new Float32Array(width * height);
  let written = 0;
  for (let s = 0; s < offsets.length && written < data.length; s++) {
    const start = offsets[s];
    const length = Math.min(counts[s] ?? 0, (data.length - written) * 4);
    if (start + length > bytes.length) fail('truncated TIFF (strip past end of file)');
    for (let o = 0; o + 4 <= length; o += 4) data[written++] = view.getFloat32(start + o, le);
  }
  if (written !== data.length) fail(`truncated TIFF: ${written} of ${data.length} values present`);
  return { data, width, height };
}

/**
 * Decodes a float TIFF, handing compressed or tiled files (which our own reader refuses) to the
 * image codec, which reads them through libtiff.
 */
export async function decodeFloatTiffAny(bytes: Uint8Array, source = '<tiff>'): Promise<FloatGrid> {
  try {
    return decodeFloatTiff(bytes, source);
  } catch (error) {
    if (!(error instanceof InputError) || !/compressed float TIFF|tiled TIFF/.test(error.message)) throw error;
  }
  try {
    const raw = await sharp(bytes, { limitInputPixels: MAX_PIXELS }).extractChannel(0).raw({ depth: 'float' }).toBuffer({ resolveWithObject: true });
    const data = new Float32Array(raw.info.width * raw.info.height);
    data.set(float32View(raw.data).subarray(0, data.length));
    return { data, width: raw.info.width, height: raw.info.height };
  } catch (error) {
    throw decodeInputError(source, error, MAX_PIXELS);
  }
}

export async function readFloatTiff(path: string): Promise<FloatGrid> {
  return decodeFloatTiffAny(await readInputFile(path), path);
}
