/**
 * A `Photo` from raw interleaved RGB samples (8-bit or 16-bit little-endian), e.g. a video frame
 * from FFmpeg's rawvideo output. Kept as its codes as readPhoto keeps a decoded photo
 * (./photoCodes.ts); the floats, made on first read, are the values readPhoto would give.
 */
import { endianness } from 'node:os';
import type { Photo } from './photo.js';
import { allGrey, keepCodes } from './photoCodes.js';
import { uint16View } from './typedView.js';

export function photoFromRaw(data: Buffer, width: number, height: number, bitDepth: 8 | 16, format: string): Photo {
  const n = width * height * 3;
  if (data.length !== n * (bitDepth === 16 ? 2 : 1)) throw new RangeError(`raw frame holds ${data.length} bytes, expected ${n * (bitDepth === 16 ? 2 : 1)}`);
  let codes: Uint8Array | Uint16Array;
  if (bitDepth === 8) codes = new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
  else if (endianness() === 'LE') codes = uint16View(data);
  else {
    codes = new Uint16Array(n);
    for (let i = 0; i < n; i++) codes[i] = data.readUInt16LE(i * 2);
  }
  const photo: Photo = { width, height, rgb: new Float32Array(0), bitDepth, format, isGrey: allGrey(codes, width * height), hadAlpha: false, orientationApplied: 1, exif: {} };
  keepCodes(photo, codes);
  return photo;
}
