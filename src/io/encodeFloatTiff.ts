/**
 * Single-channel 32-bit floating-point TIFF writer (uncompressed, one strip, little-endian).
 * Reference: TIFF Revision 6.0, Adobe Developers Association, 1992 — Section 2 (file structure,
 * IFD entries sorted by tag), Section 3 (baseline greyscale: ImageWidth 256, ImageLength 257,
 * BitsPerSample 258, Compression 259 = 1, PhotometricInterpretation 262 = 1 BlackIsZero,
 * StripOffsets 273, SamplesPerPixel 277, RowsPerStrip 278, StripByteCounts 279, XResolution 282,
 * YResolution 283, ResolutionUnit 296) and Section 19 (SampleFormat 339 = 3, IEEE floating point).
 * The image codec we use casts float data to 8-bit or three bands on output, so we write it ourselves.
 */
import { atomicWriteFile } from './atomicWriteFile.js';

const SHORT = 3;
const LONG = 4;
const RATIONAL = 5;

function checkGrid(data: Float32Array, width: number, height: number): void {
  if (!(data instanceof Float32Array)) throw new TypeError(`data must be a Float32Array, received ${Object.prototype.toString.call(data)}`);
  for (const [key, value] of [['width', width], ['height', height]] as const) {
    if (!Number.isInteger(value) || value < 1) throw new RangeError(`${key} must be an integer >= 1, received ${value}`);
  }
  if (data.length !== width * height) throw new RangeError(`data must hold width × height = ${width * height} values, received ${data.length}`);
}

export function encodeFloatTiff(data: Float32Array, width: number, height: number): Buffer {
  checkGrid(data, width, height);
  const entries: Array<[tag: number, type: number, value: number]> = [
    [256, LONG, width],
    [257, LONG, height],
    [258, SHORT, 32],
    [259, SHORT, 1],
    [262, SHORT, 1],
    [273, LONG, 0], // StripOffsets, filled below
    [277, SHORT, 1],
    [278, LONG, height],
    [279, LONG, data.byteLength],
    [282, RATIONAL, 0], // XResolution → offset of rational, filled below
    [283, RATIONAL, 0],
    [284, SHORT, 1], // PlanarConfiguration: chunky
    [296, SHORT, 1], // ResolutionUnit: none (pixels carry no physical size here)
    [339, SHORT, 3], // SampleFormat: IEEE float
  ];
  const ifdOffset = 8;
  const ifdSize = 2 + entries.length * 12 + 4;
  const rationalOffset = ifdOffset + ifdSize; // two RATIONALs, 8 bytes each
  const dataOffset = Math.ceil((rationalOffset + 16) / 16) * 16;
  const out = Buffer.alloc(dataOffset + data.byteLength);
  out.write('II', 0, 'latin1');
  out.writeUInt16LE(42, 2);
  out.writeUInt32LE(ifdOffset, 4);
  out.writeUInt16LE(entries.length, ifdOffset);
  entries.forEach(([tag, type, value], i) => {
    const at = ifdOffset + 2 + i * 12;
    out.writeUInt16LE(tag, at);
    out.writeUInt16LE(type, at + 2);
    out.writeUInt32LE(1, at + 4);
    if (tag === 273) out.writeUInt32LE(dataOffset, at + 8);
    else if (tag === 282) out.writeUInt32LE(rationalOffset, at + 8);
    else if (tag === 283) out.writeUInt32LE(rationalOffset + 8, at + 8);
    else if (type === SHORT) out.writeUInt16LE(value, at + 8);
    else out.writeUInt32LE(value, at + 8);
  });
  out.writeUInt32LE(0, ifdOffset + 2 + entries.length * 12); // no next IFD
  for (const at of [rationalOffset, rationalOffset + 8]) {
    out.writeUInt32LE(1, at);
    out.writeUInt32LE(1, at + 4);
  }
  const view = new DataView(out.buffer, out.byteOffset + dataOffset, data.byteLength);
  for (let i = 0; i < data.length; i++) view.setFloat32(i * 4, data[i], true);
  return out;
}

export async function writeFloatTiff(path: string, data: Float32Array, width: number, height: number): Promise<void> {
  await atomicWriteFile(path, encodeFloatTiff(data, width, height));
}
