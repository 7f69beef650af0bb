/**
 * A decoded photo kept as its codes (8-bit or 16-bit interleaved RGB), with its floats made only
 * when something reads them. The mapper reads the codes (../map/photoPixels.ts): a 12-MP photo is
 * 36 MB as 8-bit codes, 72 MB as 16-bit codes and 144 MB as floats, and on a virtual machine the
 * first touch of fresh memory costs more than the passes that read it.
 */
import type { Photo } from './photo.js';
import { codesToFloats } from './codeLevels.js';

/**
 * Gives `photo` its codes and an `rgb` made from them on first read (and kept), or set by
 * assignment. Whoever reads or sets `rgb` may change the floats, so from then on they are the
 * photo: the codes are dropped (`photo.codes` is gone), and a map of the photo reads the floats
 * as they are then.
 */
export function keepCodes(photo: Photo, codes: Uint8Array | Uint16Array): void {
  let rgb: Float32Array | null = null;
  photo.codes = codes;
  Object.defineProperty(photo, 'rgb', {
    enumerable: true,
    configurable: true,
    get: (): Float32Array => {
      if (rgb === null) {
        // In a SharedArrayBuffer, so that the mapper's pixel threads read the floats without a copy.
        rgb = codesToFloats(codes, 0, new Float32Array(new SharedArrayBuffer(codes.length * 4)));
        delete photo.codes;
      }
      return rgb;
    },
    set: (value: Float32Array): void => {
      rgb = value;
      delete photo.codes;
    },
  });
}

/** True when every pixel of interleaved RGB codes is grey (r = g = b); stops at the first that is not. */
export function allGrey(codes: Uint8Array | Uint16Array, pixelCount: number): boolean {
  return codes instanceof Uint16Array ? allGrey16(codes, pixelCount) : allGrey8(codes, pixelCount);
}

function allGrey8(codes: Uint8Array, pixelCount: number): boolean {
  for (let i = 0, n = pixelCount * 3; i < n; i += 3) {
    if (codes[i] !== codes[i + 1] || codes[i + 1] !== codes[i + 2]) return false;
  }
  return true;
}

function allGrey16(codes: Uint16Array, pixelCount: number): boolean {
  for (let i = 0, n = pixelCount * 3; i < n; i += 3) {
    if (codes[i] !== codes[i + 1] || codes[i + 1] !== codes[i + 2]) return false;
  }
  return true;
}
