/**
 * The photo's encoded RGB as the mapper reads it. An 8-bit photo stays as its decoded codes (one
 * byte per channel) and a value is read through a table of the 256 levels, so it is exactly the
 * float the photo would have held as floats (`v / 255` rounded to float32: the reader's table,
 * ../io/codeLevels.ts); any other photo (16-bit, a linear camera's encoded values, a photo evened off the
 * 8-bit codes) is held as floats 0..1.
 *
 * Why: a 12-MP photo is 36 MB as codes and 144 MB as floats, and on a virtual machine the first
 * touch of fresh memory costs more than the passes that read it (about 0.4 s for the float copy
 * of a 12-MP photo, against ~20 ms per pass over it).
 *
 * Readers index interleaved channels (`k = pixel·3 + channel`) with `valueAt`, or, in loops that
 * run over every pixel, take `codes`, `levels` and `values` into locals and branch once per read
 * (the branch is the same for every pixel, and the element kind at each read stays one).
 */
import type { Photo } from '../io/photo.js';
import { codesToFloats, LEVELS_8 } from '../io/codeLevels.js';

export interface PhotoPixels {
  /** Interleaved 8-bit RGB codes, or null when the photo is held as floats. */
  readonly codes: Uint8Array | null;
  /** Interleaved RGB values 0..1 when `codes` is null (else empty). */
  readonly values: Float32Array;
  /** The value of each 8-bit code (`LEVELS_8`, ../io/codeLevels.ts). */
  readonly levels: Float32Array;
  /** Interleaved samples (3 × pixels). */
  readonly length: number;
}

const NO_VALUES = new Float32Array(0);

/** A photo held as floats 0..1. */
export function floatPixels(values: Float32Array): PhotoPixels {
  return { codes: null, values, levels: LEVELS_8, length: values.length };
}

/** An 8-bit photo held as its codes. */
export function codePixels(codes: Uint8Array): PhotoPixels {
  return { codes, values: NO_VALUES, levels: LEVELS_8, length: codes.length };
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
    const codes = new Uint8Array(new SharedArrayBuffer(pixels.codes.length));
    codes.set(pixels.codes);
    return codePixels(codes);
  }
  const values = new Float32Array(new SharedArrayBuffer(pixels.values.byteLength));
  values.set(pixels.values);
  return floatPixels(values);
}

/** A decoded photo's pixels: its 8-bit codes when the reader kept them, else its floats. */
export function pixelsOfPhoto(photo: Pick<Photo, 'codes' | 'rgb'>): PhotoPixels {
  return photo.codes ? codePixels(photo.codes) : floatPixels(photo.rgb);
}

/** The smallest code whose value is at least `value` (256 when none): v ≥ it ⇔ levels[v] ≥ value, the levels rising. */
export function firstCodeAtLeast(levels: Float32Array, value: number): number {
  let v = 0;
  while (v < 256 && levels[v] < value) v++;
  return v;
}
