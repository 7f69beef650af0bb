/** Validates a caller's pixel limit against MAX_PIXELS (see ./limits.ts). */
import { MAX_PIXELS } from './limits.js';

export function checkMaxPixels(maxPixels: number | undefined): number {
  if (maxPixels === undefined) return MAX_PIXELS;
  if (typeof maxPixels !== 'number') throw new TypeError(`maxPixels must be a number, received ${typeof maxPixels}`);
  if (!Number.isInteger(maxPixels) || maxPixels < 1 || maxPixels > MAX_PIXELS) {
    throw new RangeError(`maxPixels must be an integer from 1 to ${MAX_PIXELS}, received ${maxPixels}`);
  }
  return maxPixels;
}
