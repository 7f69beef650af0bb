/**
 * Decodes a photograph into upright, interleaved RGB floats scaled 0..1. An 8-bit RGB photo (the
 * common case) keeps its decoded codes instead (`photo.codes`), which the mapper reads directly;
 * its floats are made on first read of `photo.rgb`, and from then on they are the photo (the
 * codes are dropped, so changes made to the floats are what a map sees).
 *
 * - EXIF orientation is applied (codec auto-orient); the value applied is reported.
 * - 16-bit PNG/TIFF are read at 16 bits (values / 65535); everything else at 8 bits (/ 255).
 * - Grey (1 channel) and grey + alpha (2 channels) are expanded to RGB; alpha is kept apart.
 * - Content is sniffed, so a wrongly named file still reads if it is a real image.
 * - 8-bit files with an embedded ICC profile are converted to sRGB by the codec; files without a
 *   profile are taken as sRGB (common practice for camera JPEGs).
 * - 16-bit files are read with their profile ignored: the codec (sharp 0.35) converts 16-bit
 *   colour-managed input into Display P3, not sRGB, which would shift every value. An sRGB-tagged
 *   16-bit file is therefore read exactly; any other profile is named in `photo.warnings`.
 */
import sharp from './sharp.js';
import type { Metadata, OutputInfo } from 'sharp';
import { InputError } from '../errors.js';
import { MAX_PIXELS } from './limits.js';
import { parseExifTime } from './exifTime.js';
import { checkInputFile, readInputFile } from './readInputFile.js';
import { decodeInputError } from './decodeErrors.js';
import { checkMaxPixels } from './checkMaxPixels.js';
import { uint16View } from './typedView.js';
import { iccDescription, isSrgbDescription } from './iccDescription.js';
import type { Photo, ReadPhotoOptions } from './photo.js';
import { allGrey, keepCodes } from './photoCodes.js';

export async function readPhoto(path: string, options: ReadPhotoOptions = {}): Promise<Photo> {
  // A page of a stack is read from the file (a stack of a thousand frames need not sit in memory).
  const bytes: Buffer | string = options.page === undefined ? await readInputFile(path) : (await checkInputFile(path), path);
  return decodePhoto(bytes, path, options);
}

/**
 * Decodes a photo held in memory (the bytes of a JPEG, PNG or TIFF file) as `readPhoto` decodes a
 * file; `name` stands for the photo in messages and errors.
 */
export async function readPhotoBytes(bytes: Uint8Array, name: string, options: ReadPhotoOptions = {}): Promise<Photo> {
  return decodePhoto(Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), name, options);
}

/** Any other layout (grey, alpha, 16 bit) into `rgb` and `alpha`; true when every opaque pixel is grey. */
function expandSamples(
  samples: Uint8Array | Uint16Array,
  rgb: Float32Array,
  alpha: Float32Array | undefined,
  pixelCount: number,
  channels: number,
  colourChannels: number,
  hasAlpha: boolean,
  scale: number,
): boolean {
  let allEqual = true;
  for (let i = 0, s = 0, o = 0; i < pixelCount; i++, s += channels, o += 3) {
    if (colourChannels === 1) {
      const v = samples[s] * scale;
      rgb[o] = v;
      rgb[o + 1] = v;
      rgb[o + 2] = v;
    } else {
      const r = samples[s];
      const g = samples[s + 1];
      const b = samples[s + 2];
      // Transparent pixels say nothing about colour (they are often black or white).
      if (allEqual && (r !== g || g !== b) && (!hasAlpha || samples[s + colourChannels] * scale >= 0.5)) allEqual = false;
      rgb[o] = r * scale;
      rgb[o + 1] = g * scale;
      rgb[o + 2] = b * scale;
    }
    if (alpha) alpha[i] = samples[s + colourChannels] * scale;
  }
  return allEqual;
}

async function decodePhoto(bytes: Buffer | string, path: string, options: ReadPhotoOptions): Promise<Photo> {
  const maxPixels = checkMaxPixels(options.maxPixels);
  const page = options.page ?? 0;
  let meta: Metadata;
  try {
    // Header only (no pixels decoded), so the size can be checked and named below.
    meta = await sharp(bytes, { limitInputPixels: false, page }).metadata();
  } catch (error) {
    throw decodeInputError(path, error, maxPixels);
  }
  if (!(meta.width > 0 && meta.height > 0)) throw new InputError(path, 'image has no pixels');
  if (meta.width * meta.height > maxPixels) {
    // Enough digits that the photo's size and the limit never read the same ("50 MP, more than 50 MP").
    let digits = 3;
    const mp = (pixels: number): string => `${Number((pixels / 1e6).toPrecision(digits))} MP`;
    while (digits < 12 && mp(meta.width * meta.height) === mp(maxPixels)) digits++;
    throw new InputError(
      path,
      `image has ${meta.width}×${meta.height} pixels (${mp(meta.width * meta.height)}), more than the limit of ${maxPixels} pixels (${mp(maxPixels)}); crop or down-sample it first`,
    );
  }
  const is16 = meta.depth === 'ushort';
  const greySource = meta.channels <= 2;
  // Converting to (16-bit) sRGB expands grey to three equal channels and keeps alpha;
  // converting to 'b-w' would drop the alpha band of grey + alpha images.
  const space = is16 ? 'rgb16' : 'srgb';
  let raw: { data: Buffer; info: OutputInfo };
  const decode = (failOn: 'warning' | 'none') =>
    sharp(bytes, { autoOrient: true, limitInputPixels: maxPixels, failOn, ignoreIcc: is16, page })
      .toColourspace(space)
      .raw({ depth: is16 ? 'ushort' : 'uchar' })
      .toBuffer({ resolveWithObject: true });
  // The decoder's warnings (corrupt data, a premature end of the data) are errors: a damaged
  // photo would give a map half of garbage. `allowDamaged` decodes what it can instead.
  let damage: string | null = null;
  try {
    raw = await decode('warning');
  } catch (error) {
    const refused = decodeInputError(path, error, maxPixels);
    if (!options.allowDamaged || !/truncated or corrupt|damaged PNG/.test(refused.message)) {
      throw /truncated or corrupt|damaged PNG/.test(refused.message) ? new InputError(path, `${refused.message.slice(path.length + 2)}; add --allow-damaged to map what decodes`) : refused;
    }
    damage = (error instanceof Error ? error.message : String(error)).replace(/\s*\n\s*/g, ' ').trim();
    try {
      raw = await decode('none');
    } catch (again) {
      throw decodeInputError(path, again, maxPixels);
    }
  }
  const { width, height, channels } = raw.info;
  const pixelCount = width * height;
  const samples: Uint8Array | Uint16Array = is16
    ? uint16View(raw.data)
    : new Uint8Array(raw.data.buffer, raw.data.byteOffset, raw.data.byteLength);
  if (samples.length !== pixelCount * channels) {
    throw new InputError(path, `decoder returned ${samples.length} samples, expected ${pixelCount * channels}`);
  }
  const scale = is16 ? 1 / 65535 : 1 / 255;
  const colourChannels = channels === 2 || channels === 4 ? channels - 1 : channels;
  const hasAlpha = channels === 2 || channels === 4;
  // RGB without alpha (the common case), 8-bit or 16-bit, keeps its codes (./photoCodes.ts);
  // anything else becomes floats now. The floats live in a SharedArrayBuffer, so that the mapper's
  // pixel threads read them without a copy.
  const codes = channels === 3 ? samples : null;
  const rgb = codes ? new Float32Array(0) : new Float32Array(new SharedArrayBuffer(pixelCount * 3 * 4));
  const alpha = hasAlpha ? new Float32Array(pixelCount) : undefined;
  // The loops are functions of their own: in this long async function V8 compiled them on the
  // fly (on-stack replacement) for every photo of a series, with all of decodePhoto around them.
  const allEqual = codes ? allGrey(codes, pixelCount) : expandSamples(samples, rgb, alpha, pixelCount, channels, colourChannels, hasAlpha, scale);
  const orientation = typeof meta.orientation === 'number' && meta.orientation >= 1 && meta.orientation <= 8 ? meta.orientation : 1;
  const photo: Photo = {
    width,
    height,
    rgb,
    bitDepth: is16 ? 16 : 8,
    format: String(meta.format),
    isGrey: greySource || colourChannels === 1 || allEqual,
    hadAlpha: hasAlpha,
    orientationApplied: orientation,
    exif: parseExifTime(meta.exif),
  };
  if (codes) keepCodes(photo, codes);
  if (typeof meta.chromaSubsampling === 'string') photo.chromaSubsampling = meta.chromaSubsampling;
  if (typeof meta.pages === 'number' && meta.pages > 1 && options.page === undefined) {
    // Only the first page is decoded; say so, since a stack of frames may hide in one file.
    photo.warnings = [...(photo.warnings ?? []), `the file holds ${meta.pages} pages (images); page 1 of ${meta.pages} was used (split the pages into separate files to map the others)`];
  }
  if (damage !== null) {
    // Rows the decoder could not read come back as flat mid-grey (every sample 128, or 32896 at
    // 16 bits) from the bottom up; those are made transparent, so they get no estimate.
    const fill = is16 ? 32896 : 128;
    const rowSamples = width * channels;
    let firstFilled = height;
    for (let y = height - 1; y >= 0; y--) {
      const row = samples.subarray(y * rowSamples, (y + 1) * rowSamples);
      if (!row.every((v) => v === fill)) break;
      firstFilled = y;
    }
    const a = alpha ?? new Float32Array(pixelCount).fill(1);
    a.fill(0, firstFilled * width);
    photo.alpha = a;
    photo.warnings = [
      ...(photo.warnings ?? []),
      `damaged image (${damage}); mapped what decodes${firstFilled < height ? `, the ${height - firstFilled} row(s) from row ${firstFilled} on that did not decode have no estimate` : '; parts of the map may be wrong'}`,
    ];
  }
  if (alpha && !photo.alpha) photo.alpha = alpha;
  const profile = iccDescription(meta.icc);
  if (is16 && meta.icc && !isSrgbDescription(profile)) {
    photo.warnings = [...(photo.warnings ?? []), `16-bit image carries the colour profile "${profile ?? 'unnamed'}"; its values are used as if sRGB. Convert it to sRGB first for calibrated results.`];
  }
  return photo;
}
