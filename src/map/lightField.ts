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
 *
 * Two starts from outside the photo: a series frame starts from the previous frame's field (the
 * lamp and lens rarely change between frames) and refines it the same way; a calibration's field
 * (a fixed inspection station, fitted on known regions spread over its photo) is applied as it is.
 */
import { relativeGainAt } from './lightEvenness.js';
import { evenOutLight } from './evenOutLight.js';
import type { PhotoPixels } from './photoPixels.js';
import type { CameraResponse } from '../colour/toneResponse.js';
import type { ExposureField, ExposureParameters, MapResult } from './types.js';

export type { ExposureField } from './types.js';

export type LightFieldMode = 'auto' | 'off';

/** Max/min gain of the first map above which a field is fitted (a judgement: 4 %). */
export const START_RATIO = 1.04;
/** Remaining max/min gain at which the alternation stops. */
export const SETTLED_RATIO = 1.02;
/**
 * Rounds at most. Each round sees the light only where the last map read the film right, so a
 * dark corner (35 % fall-off times the lens's cos⁴ vignetting) is reached a step at a time: three
 * rounds left a close-up wafer's darkest corner 6 % under-corrected and 2 % of its film a whole
 * order off; five settle it (measured with `npm run bench:accuracy -- --light`). The loop stops as
 * soon as the light is even within SETTLED_RATIO, so evenly lit or mildly uneven photos pay less.
 */
const MAX_ROUNDS = 5;
/**
 * Each round's measured gain is added 1.5 times (over-relaxation). The measurement understates the
 * fall-off, since pixels still read at a wrong thickness pull the photo-to-model ratio towards one;
 * taking a larger step settles in fewer rounds (measured on the bench's light scenes: 5, 5, 4
 * rounds at 1.0 against 4, 4, 2 at 1.6, with equal or smaller errors). A step that overshoots is
 * measured and taken back by the next round, and a round is kept only when the photo ends more even.
 */
const OVER_RELAXATION = 1.5;

/** Max/min gain left over the film; a map that found no film, or too little to tell, is never "more even". */
function ratioOf(result: MapResult): number {
  const e = result.lightEvenness;
  if (result.filmArea?.found === false || !e) return Infinity;
  return e.gainMax / e.gainMin;
}

/**
 * The range of a field's log gain over the pixels a map measured, a little wider: the field is
 * held within it elsewhere, so a surface fitted over a film in the middle does not extrapolate
 * to wild gains over the background in the corners (which could turn a dark chuck into "film").
 */
function logGainRangeOver(result: MapResult, coefficients: readonly number[], width: number, height: number): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  const stride = Math.max(1, Math.floor((width * height) / 20_000));
  for (let i = 0; i < width * height; i += stride) {
    if (!Number.isFinite(result.thicknessNm[i])) continue;
    const g = Math.log(relativeGainAt(coefficients, width, height, i % width, Math.floor(i / width)));
    if (g < lo) lo = g;
    if (g > hi) hi = g;
  }
  return Number.isFinite(lo) ? [lo - CLAMP_MARGIN, hi + CLAMP_MARGIN] : null;
}

/** Log-gain margin beyond the range seen over the film (2 %). */
const CLAMP_MARGIN = 0.02;

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

/** A subsampled copy of the photo to fit the field on (large photos), with its own mapper. */
export interface LightFieldPreview<P extends MapResult> {
  readonly rgb: PhotoPixels;
  readonly width: number;
  readonly height: number;
  readonly mapWith: (pixels: PhotoPixels, fitStart?: ExposureParameters | null, fixed?: ExposureParameters | null) => P;
  /** The same, measuring only the middle of the photo (see `mapWithLightField`). */
  readonly mapCentreWith?: (pixels: PhotoPixels) => P;
  /**
   * A coarser copy for the alternation's rounds, after the first map on this one: the rounds only
   * measure the light, a smooth surface of seven numbers, and each costs a map (mapPhoto.ts).
   */
  readonly rounds?: PhotoToMap<P> | null;
}

interface Alternation<R extends MapResult> {
  readonly first: R;
  readonly best: R;
  readonly coefficients: number[] | null;
  /** The log-gain range the best map was evened with (null: not clamped). */
  readonly clamp: [number, number] | null;
  readonly rounds: number;
}

/** A photo (or a subsampled copy) and its mapper. */
export interface PhotoToMap<R extends MapResult> {
  readonly rgb: PhotoPixels;
  readonly width: number;
  readonly height: number;
  readonly mapWith: (pixels: PhotoPixels, fitStart?: ExposureParameters | null, fixed?: ExposureParameters | null) => R;
}

/** The alternation on one photo (full size, or a preview): first map, then rounds while uneven. */
function alternate<R extends MapResult>(
  rgb: PhotoPixels,
  width: number,
  height: number,
  mapWith: (pixels: PhotoPixels, fitStart?: ExposureParameters | null, fixed?: ExposureParameters | null) => R,
  start: readonly number[] | null,
  startFlare: readonly number[],
  fitStart: ExposureParameters | null = null,
  startResponse: CameraResponse | null = null,
  /** A coarser copy of the same photo for the rounds (see LightFieldPreview.rounds); null = the photo itself. */
  roundsOn: PhotoToMap<R> | null = null,
): Alternation<R> {
  const self: PhotoToMap<R> = { rgb, width, height, mapWith };
  let on: PhotoToMap<R> = roundsOn ?? self;
  const first = mapWith(start ? evenOutLight(rgb, width, height, start, startFlare, null, startResponse) : rgb, fitStart);
  if (!first.lightEvenness || first.filmArea?.found === false) return { first, best: first, coefficients: start ? [...start] : null, clamp: null, rounds: 0 };
  if (!start && ratioOf(first) <= START_RATIO) return { first, best: first, coefficients: null, clamp: null, rounds: 0 };
  let best = first;
  // A start field is kept unless a round leaves the photo more even (it came from the previous frame).
  let coefficients: number[] | null = start ? [...start] : null;
  const total = start ? [...start] : [0, 0, 0, 0, 0, 0, 0];
  let current = first;
  let rounds = 0;
  let clamp: [number, number] | null = null;
  while (rounds < MAX_ROUNDS && current.lightEvenness && ratioOf(current) > SETTLED_RATIO) {
    const step = current.lightEvenness.logGainCoefficients;
    for (let k = 0; k < total.length; k++) total[k] += OVER_RELAXATION * (step[k] ?? 0);
    // (The field's coordinates are fractions of the photo: the same on every copy of it.)
    const range = logGainRangeOver(current, total, current.width, current.height);
    // Each round starts its photo-formation fit from the last (the photo changed only by the field).
    // The camera response starts again from where the photo's started (a previous frame's or a
    // calibration's, else none): uneven light spreads each hue over many brightnesses, so the first
    // map may find enough colours to fit a response that the evened photo does not support (the
    // fall-off then passes for a tone curve, and would be held as one).
    const fitStartOfRound = { ...current.fitted, response: startResponse };
    const flare = current.fitted.flare;
    const response = current.fitted.response ?? null;
    current = on.mapWith(evenOutLight(on.rgb, on.width, on.height, total, flare, range, response), fitStartOfRound);
    if (on !== self && (!current.lightEvenness || current.filmArea?.found === false)) {
      // The coarser copy lost the film (a small film, a few of its pixels): the rounds go on at full detail.
      on = self;
      current = on.mapWith(evenOutLight(on.rgb, on.width, on.height, total, flare, range, response), fitStartOfRound);
    }
    rounds++;
    if (ratioOf(current) < ratioOf(best)) {
      best = current;
      coefficients = [...total];
      clamp = range;
    }
  }
  return { first, best, coefficients, clamp, rounds };
}

/**
 * The retry from the middle of the photo: map the middle alone (the light varies least there),
 * then the whole photo with the photo-formation fit started from the middle's and, when the
 * middle was uneven too, the plane part of its field (a quadratic fitted over the middle would
 * extrapolate wildly to the corners); the alternation then refines the field over the film.
 * Null when the middle shows no film either, or the whole photo still shows none.
 */
function fromCentre<R extends MapResult>(
  rgb: PhotoPixels,
  width: number,
  height: number,
  mapWith: (pixels: PhotoPixels, fitStart?: ExposureParameters | null, fixed?: ExposureParameters | null) => R,
  mapCentreWith: (pixels: PhotoPixels) => R,
  startFlare: readonly number[],
): Alternation<R> | null {
  const centre = mapCentreWith(rgb);
  if (!centre.filmArea || centre.filmArea.found === false) return null;
  const e = centre.lightEvenness;
  const plane = e && e.gainMax / e.gainMin > START_RATIO ? [e.logGainCoefficients[0], e.logGainCoefficients[1], e.logGainCoefficients[2], 0, 0, 0, 0] : null;
  const run = alternate(rgb, width, height, mapWith, plane, plane ? centre.fitted.flare : startFlare, centre.fitted, centre.fitted.response ?? null);
  // Kept only when the whole photo then shows at least the film the middle showed, and the model
  // explains it (a few stray pixels "found" would be worse than saying no film was found).
  const area = run.best.filmArea;
  const centreArea = centre.filmArea?.areaPx ?? 0;
  if (!area || area.found === false || area.areaPx < centreArea || centre.fitQuality?.verdict === 'poor' || run.best.fitQuality?.verdict === 'poor') return null;
  return run;
}

/** The photo and how to map it, for `mapWithLightField`. */
export interface LightFieldJob<R extends MapResult, P extends MapResult = R> {
  /** Encoded RGB, interleaved. */
  readonly rgb: PhotoPixels;
  readonly width: number;
  readonly height: number;
  /**
   * Maps the (evened) pixels; `fitStart` starts the photo-formation fit; `fixed` replaces it;
   * `fittedOn` is the preview's map of the same (evened) photo, whose photo-formation fit the map
   * takes as its own instead of fitting again (the preview's samples are as many and as good).
   */
  readonly mapWith: (pixels: PhotoPixels, fitStart?: ExposureParameters | null, fixed?: ExposureParameters | null, fittedOn?: P | null) => R;
  readonly mode: LightFieldMode;
  /** A previous frame's field to start from, or a calibration's to apply. */
  readonly start?: LightFieldStart | null;
  /** A subsampled copy of a large photo to find the field on. */
  readonly preview?: LightFieldPreview<P> | null;
  /**
   * Map the photo itself first and go to the preview only when that map finds the light uneven
   * (or no film): a series frame whose previous frame was evenly lit (MapOptions.fullSizeFirst).
   * Ignored with a `start`.
   */
  readonly fullSizeFirst?: boolean;
  /** The photo holds 8-bit codes (the full-size photo evened after a preview is kept on them). */
  readonly eightBit?: boolean;
  /** Threads to even the full-size photo on (./evenOutLight.ts; the result is the same whatever the count); default 1. */
  readonly threads?: number;
  /**
   * Maps the pixels measuring only the middle of the photo. When one exposure explains no part of
   * the photo (strong fall-off across a film on a dark background can make the one-exposure fit
   * fail everywhere), the field is first found where the light varies least — the middle — then
   * refined over the whole photo; a photo that is not a film finds no film there either.
   */
  readonly mapCentreWith?: ((pixels: PhotoPixels) => R) | null;
}

/**
 * Maps the photo with the exposure as a smooth field when the light is uneven. With a `preview`
 * (a large photo subsampled to a few hundred thousand pixels), the field is found by the
 * alternation on the preview and the full photo is mapped once, evened by it: an uneven 12-MP
 * photo then costs one full map plus a few small ones instead of 2–6 full maps. The field's
 * coordinates are fractions of the photo (./lightEvenness.ts), the same on both.
 */
export function mapWithLightField<R extends MapResult, P extends MapResult = R>(job: LightFieldJob<R, P>): { result: R; field: ExposureField | null } {
  const { rgb, width, height, mapWith, mode } = job;
  const start = job.start ?? null;
  const preview = job.preview ?? null;
  const mapCentreWith = job.mapCentreWith ?? null;
  if (start && start.use === 'fixed') {
    const coefficients = [...start.logGainCoefficients];
    const result = mapWith(evenOutLight(rgb, width, height, coefficients, start.flare, null, start.response ?? null));
    return { result, field: fieldOver(result, coefficients, width, height, 0, 'calibration', false) };
  }
  const startCoefficients = mode === 'auto' && start ? [...start.logGainCoefficients] : null;
  const startFlare = start?.flare ?? [0, 0, 0];
  const startResponse = start?.response ?? null;
  if (mode === 'off') return { result: mapWith(rgb), field: null };
  if (preview && job.fullSizeFirst === true && !startCoefficients) {
    // Evenly lit as the frame before was: one full-size map with its own fit. Otherwise that map is
    // set aside and the light is found on the preview, as for any large photo.
    const whole = mapWith(rgb);
    if (whole.filmArea?.found !== false && (!whole.lightEvenness || ratioOf(whole) <= START_RATIO)) return { result: whole, field: null };
  }
  if (preview) {
    let small = alternate(preview.rgb, preview.width, preview.height, preview.mapWith, startCoefficients, startFlare, null, startResponse, preview.rounds ?? null);
    if (!small.coefficients && small.first.filmArea?.found === false && preview.mapCentreWith) {
      small = fromCentre(preview.rgb, preview.width, preview.height, preview.mapWith, preview.mapCentreWith, startFlare) ?? small;
    }
    // The full map takes the preview's photo-formation fit (the same photo, or the same photo
    // evened by the same field) when the preview found film.
    const fittedOn = (map: P): P | null => (map.filmArea?.found === false ? null : map);
    if (!small.coefficients) return { result: mapWith(rgb, null, null, fittedOn(small.first)), field: null };
    // An 8-bit photo evened is put back on 8-bit codes: the per-colour memo of the pixel pass
    // (./pixelPass.ts) then serves the full-size map as it serves an evenly lit photo.
    const evened = evenOutLight(rgb, width, height, small.coefficients, small.best.fitted.flare, small.clamp, small.best.fitted.response ?? null, job.eightBit === true, job.threads ?? 1);
    const result = mapWith(evened, small.best.fitted, null, fittedOn(small.best));
    return { result, field: fieldOver(result, small.coefficients, width, height, small.rounds, 'photo', true) };
  }
  let run = alternate(rgb, width, height, mapWith, startCoefficients, startFlare, null, startResponse);
  if (!run.coefficients && run.first.filmArea?.found === false && mapCentreWith) {
    run = fromCentre(rgb, width, height, mapWith, mapCentreWith, startFlare) ?? run;
  }
  if (!run.coefficients) return { result: run.first, field: null };
  return { result: run.best, field: fieldOver(run.best, run.coefficients, width, height, run.rounds, 'photo', true) };
}

/**
 * The field's range over the film (the pixels the final map measured), normalised to median 1
 * over them when `normalise` (a fitted field: the exposure absorbs the median); a calibration's
 * field is reported as stored (its exposure was fitted with it).
 */
function fieldOver(result: MapResult, coefficients: number[], width: number, height: number, rounds: number, source: ExposureField['source'], normalise: boolean): ExposureField | null {
  const gains: number[] = [];
  const stride = Math.max(1, Math.floor((width * height) / 20_000));
  for (let i = 0; i < width * height; i += stride) {
    if (!Number.isFinite(result.thicknessNm[i])) continue;
    gains.push(relativeGainAt(coefficients, width, height, i % width, Math.floor(i / width)));
  }
  // A fitted field over no film at all means nothing (a calibration's is reported as applied).
  if (gains.length === 0 && source === 'photo') return null;
  gains.sort((a, b) => a - b);
  const median = gains.length > 0 && normalise ? gains[Math.floor(gains.length / 2)] : 1;
  const gainMin = gains.length > 0 ? gains[Math.floor(0.01 * (gains.length - 1))] / median : 1;
  const gainMax = gains.length > 0 ? gains[Math.ceil(0.99 * (gains.length - 1))] / median : 1;
  const out = [...coefficients];
  out[0] -= Math.log(median);
  return { logGainCoefficients: out, gainMin, gainMax, rounds, source };
}
