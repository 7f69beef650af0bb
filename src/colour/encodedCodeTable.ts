/**
 * Integer output codes of the photo encoding, tabulated against linear light for hot loops:
 * codes[round(v · maxIndex)] = round(encode(v) · (2^bits − 1)) for v in 0..1, with encode the
 * sRGB transfer function (IEC 61966-2-1:1999) or the identity for linear (raw) output.
 * Resolution: 65 536 steps for 8-bit output (a code can differ by one from the exact rounding only
 * where the exact value lies within 0.05 of a half-code), 2^20 steps for 16-bit sRGB output
 * (within one code of exact), exact for 16-bit linear output. Tables are built once per kind.
 */
import { encodeSrgb } from './srgb.js';

export interface EncodedCodeTable {
  readonly codes: Uint8Array | Uint16Array;
  /** Index of v = 1: look up codes[(clamp01(v) * maxIndex + 0.5) | 0]. */
  readonly maxIndex: number;
}

const cache = new Map<string, EncodedCodeTable>();

export function encodedCodeTable(encoding: 'srgb' | 'linear', bitDepth: 8 | 16): EncodedCodeTable {
  if (encoding !== 'srgb' && encoding !== 'linear') throw new RangeError(`encoding must be 'srgb' or 'linear', received ${String(encoding)}`);
  if (bitDepth !== 8 && bitDepth !== 16) throw new RangeError(`bitDepth must be 8 or 16, received ${String(bitDepth)}`);
  const key = `${encoding}${bitDepth}`;
  let table = cache.get(key);
  if (!table) {
    const maxIndex = bitDepth === 8 || encoding === 'linear' ? 65535 : 1048575;
    const top = bitDepth === 8 ? 255 : 65535;
    const codes = bitDepth === 8 ? new Uint8Array(maxIndex + 1) : new Uint16Array(maxIndex + 1);
    for (let i = 0; i <= maxIndex; i++) {
      const v = i / maxIndex;
      codes[i] = Math.round((encoding === 'srgb' ? Math.min(1, encodeSrgb(v)) : v) * top);
    }
    table = { codes, maxIndex };
    cache.set(key, table);
  }
  return table;
}
