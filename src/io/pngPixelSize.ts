/**
 * The physical pixel size of a PNG: its pHYs chunk (PNG specification, W3C Recommendation 2003,
 * section 11.3.5.3: pixels per unit X and Y as 4-byte unsigned integers, unit specifier 1 = metre,
 * placed before the first IDAT). The image codec writes pHYs with 1000 pixels per metre (25.4 dpi)
 * whatever the picture shows; `setPngPixelSize` replaces that chunk with the true size, or drops
 * it when the size is unknown, so no program is told a scale nobody measured.
 */

import { crc32 } from 'node:zlib';

const SIGNATURE = Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]);

/** Pixels per metre for a pixel size in µm (the pHYs value, rounded to a whole number). */
export function pixelsPerMetre(pixelSizeUm: number): number {
  if (!(Number.isFinite(pixelSizeUm) && pixelSizeUm > 0)) throw new RangeError(`pixelSizeUm must be a finite number > 0, received ${pixelSizeUm}`);
  const perMetre = Math.round(1e6 / pixelSizeUm);
  if (perMetre < 1 || perMetre > 0x7fffffff) throw new RangeError(`pixelSizeUm ${pixelSizeUm} gives ${perMetre} pixels per metre, outside what a PNG can state (1 to 2³¹−1)`);
  return perMetre;
}

function physChunk(perMetre: number): Buffer {
  const chunk = Buffer.alloc(12 + 9);
  chunk.writeUInt32BE(9, 0);
  chunk.write('pHYs', 4, 'latin1');
  chunk.writeUInt32BE(perMetre, 8);
  chunk.writeUInt32BE(perMetre, 12);
  chunk[16] = 1; // unit: metre
  // CRC-32 of the chunk type and data (PNG specification, Annex D), by zlib's crc32.
  chunk.writeUInt32BE(crc32(chunk.subarray(4, 17)), 17);
  return chunk;
}

/**
 * The PNG with its pHYs chunk set from `pixelSizeUm` (square pixels, unit metre), or removed when
 * `pixelSizeUm` is null. Other chunks are kept byte for byte.
 */
export function setPngPixelSize(png: Uint8Array, pixelSizeUm: number | null): Buffer {
  const bytes = Buffer.from(png.buffer, png.byteOffset, png.byteLength);
  if (bytes.length < 8 || !bytes.subarray(0, 8).equals(SIGNATURE)) throw new TypeError('setPngPixelSize: not a PNG (signature missing)');
  const parts: Buffer[] = [SIGNATURE];
  let at = 8;
  let placed = pixelSizeUm === null;
  while (at + 12 <= bytes.length) {
    const length = bytes.readUInt32BE(at);
    const type = bytes.toString('latin1', at + 4, at + 8);
    const end = at + 12 + length;
    if (end > bytes.length) throw new TypeError(`setPngPixelSize: chunk ${type} runs past the end of the file`);
    if (type === 'IDAT' && !placed) {
      parts.push(physChunk(pixelsPerMetre(pixelSizeUm!)));
      placed = true;
    }
    if (type !== 'pHYs') parts.push(bytes.subarray(at, end));
    at = end;
    if (type === 'IEND') break;
  }
  return Buffer.concat(parts);
}
