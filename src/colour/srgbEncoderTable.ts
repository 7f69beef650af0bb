/**
 * A fast sRGB encoder for hot loops: the IEC 61966-2-1:1999 transfer function (see ./srgb.ts)
 * tabulated at 65 537 points over linear 0..1 and read with linear interpolation. The table's
 * largest error is below 1e-6 (at the 0.0031308 junction; 0.07 of a 16-bit code), checked in the tests; values are
 * clamped to 0..1 first.
 */
import { decodeSrgb, encodeSrgb } from './srgb.js';

const SIZE = 65536;
let table: Float64Array | null = null;

function encoderTable(): Float64Array {
  if (!table) {
    table = new Float64Array(SIZE + 2);
    for (let i = 0; i <= SIZE; i++) table[i] = encodeSrgb(i / SIZE);
    table[SIZE + 1] = table[SIZE];
  }
  return table;
}

/** Points per unit of the encoder table (index = clamped linear × SRGB_TABLE_SIZE) and of the decoder's (× 65535). */
export const SRGB_TABLE_SIZE = SIZE;

/** The encoder's table itself (SRGB_TABLE_SIZE + 2 values, a guard at the end), for fused hot loops. */
export function srgbEncodeTable(): Float64Array {
  return encoderTable();
}

/** Returns a function linear (clamped to 0..1) → encoded 0..1, using the shared table. */
export function createSrgbEncoder(): (linear: number) => number {
  const t = encoderTable();
  return (linear) => {
    const v = linear > 0 ? (linear < 1 ? linear : 1) * SIZE : 0;
    const i = v | 0;
    const f = v - i;
    return t[i] + f * (t[i + 1] - t[i]);
  };
}

let decodeTable: Float64Array | null = null;

/** The decoder's table (index = clamped encoded × 65535; exact at every 8- and 16-bit code), for fused hot loops. */
export function srgbDecodeTable(): Float64Array {
  if (!decodeTable) {
    decodeTable = new Float64Array(SIZE + 2);
    for (let i = 0; i <= SIZE; i++) decodeTable[i] = decodeSrgb(i / 65535 > 1 ? 1 : i / 65535);
    decodeTable[SIZE + 1] = decodeTable[SIZE];
  }
  return decodeTable;
}

/**
 * The inverse for hot loops: encoded 0..1 (clamped) → linear, the IEC 61966-2-1 decoding tabulated
 * at 65 537 points and read with linear interpolation (exact at every 8- and 16-bit code, whose
 * values k/255 and k/65535 fall on table points since 65 535 = 255 · 257).
 */
export function createSrgbDecoder(): (encoded: number) => number {
  const t = srgbDecodeTable();
  return (encoded) => {
    const v = encoded > 0 ? (encoded < 1 ? encoded : 1) * 65535 : 0;
    const i = v | 0;
    const f = v - i;
    return t[i] + f * (t[i + 1] - t[i]);
  };
}
