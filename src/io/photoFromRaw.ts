/**
 * A `Photo` from raw interleaved RGB samples (8-bit or 16-bit little-endian), e.g. a video frame
 * from FFmpeg's rawvideo output. Values are scaled to 0..1 as readPhoto does, into shared memory.
 */
import type { Photo } from './photo.js';

export function photoFromRaw(data: Buffer, width: number, height: number, bitDepth: 8 | 16, format: string): Photo {
  const n = width * height * 3;
  if (data.length !== n * (bitDepth === 16 ? 2 : 1)) throw new RangeError(`raw frame holds ${data.length} bytes, expected ${n * (bitDepth === 16 ? 2 : 1)}`);
  const rgb = new Float32Array(new SharedArrayBuffer(n * 4));
  let differ = 0;
  if (bitDepth === 8) {
    const level = new Float32Array(256);
    for (let v = 0; v < 256; v++) level[v] = v / 255;
    for (let i = 0; i < n; i += 3) {
      differ |= (data[i] ^ data[i + 1]) | (data[i + 1] ^ data[i + 2]);
      rgb[i] = level[data[i]];
      rgb[i + 1] = level[data[i + 1]];
      rgb[i + 2] = level[data[i + 2]];
    }
  } else {
    for (let i = 0; i < n; i += 3) {
      const r = data.readUInt16LE(i * 2);
      const g = data.readUInt16LE(i * 2 + 2);
      const b = data.readUInt16LE(i * 2 + 4);
      differ |= (r ^ g) | (g ^ b);
      rgb[i] = r / 65535;
      rgb[i + 1] = g / 65535;
      rgb[i + 2] = b / 65535;
    }
  }
  return { width, height, rgb, bitDepth, format, isGrey: differ === 0, hadAlpha: false, orientationApplied: 1, exif: {} };
}
