/**
 * What the library's one-call jobs take as a photo: a file path, the bytes of a photo file (a
 * JPEG, PNG or TIFF held in memory), or a photo decoded already (`readPhoto`).
 */
import { readPhoto, readPhotoBytes } from '../io/readPhoto.js';
import { MAP_MAX_PIXELS } from '../io/limits.js';
import type { Photo } from '../io/photo.js';

export type PhotoInput = string | Uint8Array | Photo;

export interface PhotoInputOptions {
  /** The photo's name in messages and records when it is given as bytes or decoded (default "photo"). */
  readonly name?: string;
  /** Map or calibrate a photo the decoder reports as damaged as far as it decodes (default false). */
  readonly allowDamaged?: boolean;
}

/** The decoded photo and the name that stands for it. */
export async function photoFromInput(input: PhotoInput, options: PhotoInputOptions = {}): Promise<{ photo: Photo; name: string }> {
  const read = { maxPixels: MAP_MAX_PIXELS, allowDamaged: options.allowDamaged === true };
  if (typeof input === 'string') return { photo: await readPhoto(input, read), name: input };
  const name = options.name ?? 'photo';
  if (input instanceof Uint8Array) return { photo: await readPhotoBytes(input, name, read), name };
  if (input && input.rgb instanceof Float32Array && input.width > 0 && input.height > 0 && input.rgb.length === input.width * input.height * 3) {
    return { photo: input, name };
  }
  throw new TypeError('a photo is a file path, the bytes of a photo file (Uint8Array or Buffer), or a decoded photo { rgb, width, height, … } from readPhoto');
}
