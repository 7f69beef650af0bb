/**
 * sRGB decoding (IEC 61966-2-1:1999, ./srgb.ts) that reads 8-bit codes from a 256-entry table:
 * an exact value k/255 (as a float32 photo holds it) gets decodeSrgb of that very value, any other
 * value is decoded by the formula. The result is therefore identical to decodeSrgb bit for bit;
 * only the power is skipped for the values an 8-bit photo holds.
 */
import { decodeSrgb } from './srgb.js';

const CODES = Float64Array.from({ length: 256 }, (_, k) => decodeSrgb(Math.fround(k / 255)));

export function decodeSrgbCoded(encoded: number): number {
  const k = Math.round(encoded * 255);
  return k >= 0 && k <= 255 && Math.fround(k / 255) === encoded ? CODES[k] : decodeSrgb(encoded);
}
