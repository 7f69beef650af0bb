/** Validates a RasterImage record before encoding (see ./photo.ts). */
import type { RasterImage } from './photo.js';

export function checkRasterImage(image: RasterImage, name = 'image'): void {
  if (typeof image !== 'object' || image === null) throw new TypeError(`${name} must be an object, received ${String(image)}`);
  const { data, width, height, channels } = image;
  if (!(data instanceof Uint8Array) && !(data instanceof Uint16Array)) {
    throw new TypeError(`${name}.data must be a Uint8Array or Uint16Array, received ${Object.prototype.toString.call(data)}`);
  }
  for (const [key, value] of [['width', width], ['height', height]] as const) {
    if (!Number.isInteger(value) || value < 1) throw new RangeError(`${name}.${key} must be an integer >= 1, received ${value}`);
  }
  if (channels !== 1 && channels !== 2 && channels !== 3 && channels !== 4) {
    throw new RangeError(`${name}.channels must be 1, 2, 3 or 4, received ${String(channels)}`);
  }
  const expected = width * height * channels;
  if (data.length !== expected) {
    throw new RangeError(`${name}.data must hold width × height × channels = ${expected} samples, received ${data.length}`);
  }
}
