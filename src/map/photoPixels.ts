/**
 * The photo's encoded RGB as the mapper reads it. A photo read from a file stays as its decoded
 * codes (one byte per channel, or two for a 16-bit photo) and a value is read through a table of
 * the code's levels, so it is exactly the float the photo would have held as floats (`v / 255` or
 * `v / 65535` rounded to float32: the reader's tables, ../io/codeLevels.ts); any other photo (one
 * with alpha, a linear camera's encoded values, a photo evened off its codes) is held as floats 0..1.
 *
 * Why: a 12-MP photo is 36 MB as 8-bit codes, 72 MB as 16-bit codes and 144 MB as floats, and on
 * a virtual machine the first touch of fresh memory costs more than the passes that read it
 * (about 0.4 s for the float copy of a 12-MP photo, against ~20 ms per pass over it).
 *
 * Readers index interleaved channels (`k = pixel·3 + channel`) with `valueAt`, or, in loops that
 * run over every pixel, take `codes`, `levels` and `values` into locals and branch once per read
 * (the branch is the same for every pixel, and the element kind at each read stays one within a
 * run of photos of one bit depth).
 */
import type { Photo } from '../io/photo.js';
import { codesToFloats, LEVELS_8, levelsOf } from '../io/codeLevels.js';

export interface PhotoPixels {
  /** Interleaved RGB codes (8-bit or 16-bit), or null when the photo is held as floats. */
  readonly codes: Uint8Array | Uint16Array | null;
  /** Interleaved RGB values 0..1 when `codes` is null (else empty). */
  readonly values: Float32Array;
  /** The value of each code (`LEVELS_8` or the 16-bit table, ../io/codeLevels.ts). */
  readonly levels: Float32Array;
  /** Interleaved samples (3 × pixels). */
  readonly length: number;
}

const NO_VALUES = new Float32Array(0);

/** A photo held as floats 0..1. */
export function floatPixels(values: Float32Array): PhotoPixels {
  return { codes: null, values, levels: LEVELS_8, length: values.length };
}

/** A photo held as its codes. */
export function codePixels(codes: Uint8Array | Uint16Array): PhotoPixels {
  return { codes, values: NO_VALUES, levels: levelsOf(codes), length: codes.length };
}

/** The value of interleaved sample k. */
export function valueAt(pixels: PhotoPixels, k: number): number {
  const codes = pixels.codes;
  return codes !== null ? pixels.levels[codes[k]] : pixels.values[k];
}

/** The photo as floats (a copy for codes; the values themselves otherwise), for code that needs a Float32Array. */
export function pixelFloats(pixels: PhotoPixels): Float32Array {
  const codes = pixels.codes;
  return codes === null ? pixels.values : codesToFloats(codes, 0, new Float32Array(codes.length));
}

/** The same pixels in a SharedArrayBuffer (the mapper's helper threads read them in place); itself when they are already shared. */
export function sharedPixels(pixels: PhotoPixels): PhotoPixels {
  const held = pixels.codes ?? pixels.values;
  if (held.buffer instanceof SharedArrayBuffer) return pixels;
  if (pixels.codes !== null) {
    const bytes = new SharedArrayBuffer(pixels.codes.byteLength);
    const codes = pixels.codes instanceof Uint16Array ? new Uint16Array(bytes) : new Uint8Array(bytes);
    codes.set(pixels.codes);
    return codePixels(codes);
  }
  const values = new Float32Array(new SharedArrayBuffer(pixels.values.byteLength));
  values.set(pixels.values);
  return floatPixels(values);
}

/** A decoded photo's pixels: its codes when the reader kept them, else its floats. */
export function pixelsOfPhoto(photo: Pick<Photo, 'codes' | 'rgb'>): PhotoPixels {
  return photo.codes ? codePixels(photo.codes) : floatPixels(photo.rgb);
}

/** The smallest code whose value is at least `value` (the number of levels when none): v ≥ it ⇔ levels[v] ≥ value, the levels rising. */
export function firstCodeAtLeast(levels: Float32Array, value: number): number {
  let lo = 0;
  let hi = levels.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (levels[mid] < value) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
