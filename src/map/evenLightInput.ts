/**
 * What evening a photo's light needs besides the output (./evenOutLight.ts), in a module of its
 * own so that the pixel threads (./pixelThreads.ts) can carry it without importing the evening.
 */
import type { CameraResponse } from '../colour/toneResponse.js';
import type { PhotoPixels } from './photoPixels.js';

/** What evening needs besides the output (the photo's arrays in shared memory when threaded). */
export interface EvenLightInput {
  readonly rgb: PhotoPixels;
  readonly width: number;
  readonly height: number;
  /** The field's (./lightEvenness.ts: a quadratic in position plus r⁴, in fractions of the photo's half long side about its centre). */
  readonly logGainCoefficients: readonly number[];
  readonly flare: readonly number[];
  /** Hold the log gain within [lo, hi] (the range seen over the film); null = as the surface gives it. */
  readonly clamp: readonly [number, number] | null;
  readonly response: CameraResponse | null;
  /** Put the result back on 8-bit codes (k/255), as a camera would have recorded the evened light. */
  readonly eightBit: boolean;
}
