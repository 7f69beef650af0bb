/**
 * The exposure as a smooth field over the photo, fitted by alternation (block coordinate
 * descent): map with one exposure; measure the light each part of the film received relative to
 * it (./lightEvenness.ts: log gain as a quadratic in position, fitted to the photo's luminance over
 * the model's at the mapped thickness); divide that gain out of the photo in linear light
 * (flare, added after the exposure, is left as it is); map again, refitting exposure, white
 * balance and flare on the evened photo; repeat while the remaining unevenness is above
 * `SETTLED_RATIO`. The fields of the rounds multiply (their log coefficients add). A quadratic
 * surface with a radial r⁴ term (./lightEvenness.ts) has seven numbers: enough for a fall-off across the photo and lens vignetting (both
 * smooth and slow), too few to follow the film's own colours, so it cannot invent structure.
 * Evenly lit photos are left alone: the field is fitted only when the first map's unevenness
 * exceeds `START_RATIO`, and kept only when it leaves the photo more even than it found it.
 * With a camera response (picture style) the photo's values are first brought back through the
 * inverse of the response (saturation, then tone curve) to plain sRGB, decoded, divided, encoded
 * and passed through the response again, so the gain is divided out where it acted: in linear light.
 *
 * Two starts from outside the photo: a series frame starts from the previous frame's field (the
 * lamp and lens rarely change between frames) and refines it the same way; a calibration's field
 * (a fixed inspection station, fitted on known regions spread over its photo) is applied as it is.
 */
import { decodeSrgb, encodeSrgb } from '../colour/srgb.js';
import { relativeGainAt } from './lightEvenness.js';
import { applyResponse, type CameraResponse, createResponseInverse } from '../colour/toneResponse.js';
import type { ExposureField, MapResult } from './types.js';

export type { ExposureField } from './types.js';

export type LightFieldMode = 'auto' | 'off';

/** Max/min gain of the first map above which a field is fitted (a judgement: 4 %). */
export const START_RATIO = 1.04;
/** Remaining max/min gain at which the alternation stops. */
export const SETTLED_RATIO = 1.02;
const MAX_ROUNDS = 3;

function ratioOf(result: MapResult): number {
  const e = result.lightEvenness;
  return e ? e.gainMax / e.gainMin : 1;
}

/**
 * The photo with the field's gain divided out in linear light (a copy in shared memory). With a
 * camera response, each pixel is taken back through its inverse first and the response is applied
 * again after (../colour/toneResponse.ts).
 */
export function evenOutLight(
  rgb: Float32Array,
  width: number,
  height: number,
  logGainCoefficients: readonly number[],
  flare: readonly number[],
  response: CameraResponse | null = null,
): Float32Array {
  const out = new Float32Array(new SharedArrayBuffer(rgb.length * 4));
  const inverseResponse = createResponseInverse(response);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const inverse = 1 / relativeGainAt(logGainCoefficients, width, height, x, y);
      const i = (y * width + x) * 3;
      inverseResponse.invert(rgb[i], rgb[i + 1], rgb[i + 2], out, i);
      for (let c = 0; c < 3; c++) {
        const linear = decodeSrgb(out[i + c]);
        const evened = (linear - flare[c]) * inverse + flare[c];
        out[i + c] = encodeSrgb(evened < 0 ? 0 : evened > 1 ? 1 : evened);
      }
    }
    if (!inverseResponse.identity) applyResponse(out.subarray(y * width * 3, (y + 1) * width * 3), width, response);
  }
  return out;
}

export interface LightFieldStart {
  /** Log-gain coefficients to start from (a series' previous frame) or to apply as they are (a calibration). */
  readonly logGainCoefficients: readonly number[];
  /** The flare to keep while dividing the gain out before the first map (linear, per channel). */
  readonly flare: readonly number[];
  /** The camera response to undo and re-apply around the division (a calibration's or the previous frame's); absent = none. */
  readonly response?: CameraResponse | null;
  /** `fixed`: apply only (a calibration's field); `start`: apply, then refine as usual. */
  readonly use: 'fixed' | 'start';
}

export function mapWithLightField<R extends MapResult>(
  rgb: Float32Array,
  width: number,
  height: number,
  mapWith: (pixels: Float32Array) => R,
  mode: LightFieldMode,
  start: LightFieldStart | null = null,
): { result: R; field: ExposureField | null } {
  if (start && start.use === 'fixed') {
    const coefficients = [...start.logGainCoefficients];
    const result = mapWith(evenOutLight(rgb, width, height, coefficients, start.flare, start.response ?? null));
    return { result, field: fieldOver(result, coefficients, width, height, 0, 'calibration', false) };
  }
  const startCoefficients = mode === 'auto' && start ? [...start.logGainCoefficients] : null;
  const first = mapWith(startCoefficients ? evenOutLight(rgb, width, height, startCoefficients, start!.flare, start!.response ?? null) : rgb);
  if (mode === 'off' || !first.lightEvenness) return { result: first, field: startCoefficients ? fieldOver(first, startCoefficients, width, height, 0, 'photo', true) : null };
  if (!startCoefficients && ratioOf(first) <= START_RATIO) return { result: first, field: null };
  let best = first;
  // A start field is kept unless a round leaves the photo more even (it came from the previous frame).
  let bestCoefficients: number[] | null = startCoefficients ? [...startCoefficients] : null;
  const total = startCoefficients ? [...startCoefficients] : [0, 0, 0, 0, 0, 0, 0];
  let current = first;
  let rounds = 0;
  while (rounds < MAX_ROUNDS && current.lightEvenness && ratioOf(current) > SETTLED_RATIO) {
    const step = current.lightEvenness.logGainCoefficients;
    for (let k = 0; k < total.length; k++) total[k] += step[k];
    current = mapWith(evenOutLight(rgb, width, height, total, current.fitted.flare, current.fitted.response ?? null));
    rounds++;
    if (ratioOf(current) < ratioOf(best)) {
      best = current;
      bestCoefficients = [...total];
    }
  }
  if (!bestCoefficients) return { result: first, field: null };
  return { result: best, field: fieldOver(best, bestCoefficients, width, height, rounds, 'photo', true) };
}

/**
 * The field's range over the film (the pixels the final map measured), normalised to median 1
 * over them when `normalise` (a fitted field: the exposure absorbs the median); a calibration's
 * field is reported as stored (its exposure was fitted with it).
 */
function fieldOver(result: MapResult, coefficients: number[], width: number, height: number, rounds: number, source: ExposureField['source'], normalise: boolean): ExposureField {
  const gains: number[] = [];
  const stride = Math.max(1, Math.floor((width * height) / 20_000));
  for (let i = 0; i < width * height; i += stride) {
    if (!Number.isFinite(result.thicknessNm[i])) continue;
    gains.push(relativeGainAt(coefficients, width, height, i % width, Math.floor(i / width)));
  }
  gains.sort((a, b) => a - b);
  const median = gains.length > 0 && normalise ? gains[Math.floor(gains.length / 2)] : 1;
  const gainMin = gains.length > 0 ? gains[Math.floor(0.01 * (gains.length - 1))] / median : 1;
  const gainMax = gains.length > 0 ? gains[Math.ceil(0.99 * (gains.length - 1))] / median : 1;
  const out = [...coefficients];
  out[0] -= Math.log(median);
  return { logGainCoefficients: out, gainMin, gainMax, rounds, source };
}
