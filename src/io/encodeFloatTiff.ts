/**
 * Single-channel 32-bit floating-point TIFF writer (uncompressed, one strip, little-endian).
 * Reference: TIFF Revision 6.0, Adobe Developers Association, 1992 — Section 2 (file structure,
 * IFD entries sorted by tag), Section 3 (baseline greyscale: ImageWidth 256, ImageLength 257,
 * BitsPerSample 258, Compression 259 = 1, PhotometricInterpretation 262 = 1 BlackIsZero,
 * StripOffsets 273, SamplesPerPixel 277, RowsPerStrip 278, StripByteCounts 279, XResolution 282,
 * YResolution 283, ResolutionUnit 296), Section 8 (ImageDescription 270, ASCII; ResolutionUnit
 * 1 = no absolute unit, 3 = centimetre) and Section 19 (SampleFormat 339 = 3, IEEE floating point).
 * The image codec we use casts float data to 8-bit or three bands on output, so we write it ourselves.
 *
 * With a pixel size the resolution is written as pixels per centimetre (ResolutionUnit 3), so image
 * software shows the map at its true scale; without one it is 1/1 with no unit (TIFF 6.0 requires
 * the three fields, and "no unit" claims no size). The ImageDescription says what the samples are.
 */
import { atomicWriteFile } from './atomicWriteFile.js';

const SHORT = 3;
const LONG = 4;
const RATIONAL = 5;
const ASCII = 2;

export interface FloatTiffOptions {
  /** Size of one pixel on the sample, micrometres: written as XResolution/YResolution in pixels per centimetre. */
  readonly pixelSizeUm?: number | null;
  /** ImageDescription text (7-bit ASCII; TIFF 6.0 Section 2, type 2). */
  readonly description?: string;
}

/** The ImageDescription of a thickness map: quantity, unit, and what NaN means. */
export function thicknessTiffDescription(pixelSizeUm: number | null | undefined): string {
  const size = pixelSizeUm != null && pixelSizeUm > 0 ? `; pixel size ${pixelSizeUm} um` : '; pixel size not given';
  return `Lamella thickness map; quantity: film thickness; unit: nm; sample: 32-bit float; NaN: no estimate for this pixel${size}`;
}

function gcd(a: number, b: number): number {
  while (b !== 0) [a, b] = [b, a % b];
  return a;
}

/** Pixels per centimetre for a pixel size in µm, as a TIFF RATIONAL [numerator, denominator] (both < 2³²). */
export function pixelsPerCentimetre(pixelSizeUm: number): [number, number] {
  if (!(Number.isFinite(pixelSizeUm) && pixelSizeUm > 0)) throw new RangeError(`pixelSizeUm must be a finite number > 0, received ${pixelSizeUm}`);
  // 1 cm = 10⁴ µm: px/cm = 10⁴ / size = 10⁷ / (size · 10³), the pixel size kept to 1/1000 µm.
  let numerator = 10_000_000;
  let denominator = Math.max(1, Math.round(pixelSizeUm * 1000));
  if (denominator > 0xffffffff) throw new RangeError(`pixelSizeUm is too large for a TIFF resolution, received ${pixelSizeUm}`);
  const g = gcd(numerator, denominator);
  numerator /= g;
  denominator /= g;
  return [numerator, denominator];
}

function checkGrid(data: Float32Array, width: number, height: number): void {
  if (!(data instanceof Float32Array)) throw new TypeError(`data must be a Float32Array, received ${Object.prototype.toString.call(data)}`);
  for (const [key, value] of [['width', width], ['height', height]] as const) {
    if (!Number.isInteger(value) || value < 1) throw new RangeError(`${key} must be an integer >= 1, received ${value}`);
  }
  if (data.length !== width * height) throw new RangeError(`data must hold width × height = ${width * height} values, received ${data.length}`);
}

export function encodeFloatTiff(data: Float32Array, width: number, height: number, options: FloatTiffOptions = {}): Buffer {
  const [header, body] = floatTiffParts(data, width, height, options);
  return Buffer.concat([header, body]);
}

/**
 * The TIFF file as two pieces to write one after the other: header, IFD, resolution and
 * description (padded to the strip's offset), then the samples — a view of `data`, not a copy,
 * on little-endian hosts.
 */
export function floatTiffParts(data: Float32Array, width: number, height: number, options: FloatTiffOptions = {}): [Buffer, Uint8Array] {
  checkGrid(data, width, height);
  const pixelSizeUm = options.pixelSizeUm ?? null;
  const resolution: [number, number] = pixelSizeUm === null ? [1, 1] : pixelsPerCentimetre(pixelSizeUm);
  const description = options.description === undefined ? null : Buffer.from(`${options.description}\0`, 'latin1');
  if (options.description !== undefined && !/^[\x20-\x7e]*$/.test(options.description)) {
    throw new RangeError('description must be printable 7-bit ASCII (TIFF 6.0 type ASCII)');
  }
  const entries: Array<[tag: number, type: number, value: number]> = [
    [256, LONG, width],
    [257, LONG, height],
    [258, SHORT, 32],
    [259, SHORT, 1],
    [262, SHORT, 1],
    ...(description ? [[270, ASCII, 0] as [number, number, number]] : []), // ImageDescription → offset, filled below
    [273, LONG, 0], // StripOffsets, filled below
    [277, SHORT, 1],
    [278, LONG, height],
    [279, LONG, data.byteLength],
    [282, RATIONAL, 0], // XResolution → offset of rational, filled below
    [283, RATIONAL, 0],
    [284, SHORT, 1], // PlanarConfiguration: chunky
    [296, SHORT, pixelSizeUm === null ? 1 : 3], // ResolutionUnit: 1 none (no pixel size given), 3 centimetre
    [339, SHORT, 3], // SampleFormat: IEEE float
  ];
  const ifdOffset = 8;
  const ifdSize = 2 + entries.length * 12 + 4;
  const rationalOffset = ifdOffset + ifdSize; // two RATIONALs, 8 bytes each
  const descriptionOffset = rationalOffset + 16;
  const dataOffset = Math.ceil((descriptionOffset + (description?.length ?? 0)) / 16) * 16;
  const out = Buffer.alloc(dataOffset);
  out.write('II', 0, 'latin1');
  out.writeUInt16LE(42, 2);
  out.writeUInt32LE(ifdOffset, 4);
  out.writeUInt16LE(entries.length, ifdOffset);
  entries.forEach(([tag, type, value], i) => {
    const at = ifdOffset + 2 + i * 12;
    out.writeUInt16LE(tag, at);
    out.writeUInt16LE(type, at + 2);
    out.writeUInt32LE(tag === 270 ? description!.length : 1, at + 4);
    if (tag === 270) out.writeUInt32LE(descriptionOffset, at + 8);
    else if (tag === 273) out.writeUInt32LE(dataOffset, at + 8);
    else if (tag === 282) out.writeUInt32LE(rationalOffset, at + 8);
    else if (tag === 283) out.writeUInt32LE(rationalOffset + 8, at + 8);
    else if (type === SHORT) out.writeUInt16LE(value, at + 8);
    else out.writeUInt32LE(value, at + 8);
  });
  out.writeUInt32LE(0, ifdOffset + 2 + entries.length * 12); // no next IFD
  for (const at of [rationalOffset, rationalOffset + 8]) {
    out.writeUInt32LE(resolution[0], at);
    out.writeUInt32LE(resolution[1], at + 4);
  }
  if (description) description.copy(out, descriptionOffset);
  if (new Uint8Array(Uint16Array.of(1).buffer)[0] === 1) return [out, new Uint8Array(data.buffer, data.byteOffset, data.byteLength)];
  const body = Buffer.alloc(data.byteLength);
  const view = new DataView(body.buffer, body.byteOffset, data.byteLength);
  for (let i = 0; i < data.length; i++) view.setFloat32(i * 4, data[i], true);
  return [out, body];
}

export async function writeFloatTiff(path: string, data: Float32Array, width: number, height: number, options: FloatTiffOptions = {}): Promise<void> {
  await atomicWriteFile(path, floatTiffParts(data, width, height, options));
}
