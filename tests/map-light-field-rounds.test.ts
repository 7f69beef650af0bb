// The light field's alternation on a large photo (src/map/lightField.ts): the first map on the
// preview, the rounds on a coarser copy, and the fall-back to the preview when the copy loses the
// film. These are checks of the control flow with test doubles for the mapper (no optics): which
// copy each round maps, and which field comes out. The accuracy of the rounds on real photos is
// checked in map-light-evenness.test.ts (a 1.08-MP photo through the preview and its copy).
import { describe, expect, it } from 'vitest';
import { type LightFieldPreview, mapWithLightField } from '../src/map/lightField.js';
import type { ExposureParameters, MapResult } from '../src/map/types.js';
import { floatPixels, type PhotoPixels } from '../src/map/photoPixels.js';

const FITTED: ExposureParameters = { exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0], response: null };

/** A stand-in map result: found film (or not) and the light's max/min ratio and log-gain step. */
function fakeMap(width: number, height: number, found: boolean, ratio: number, step: readonly number[]): MapResult {
  return {
    width,
    height,
    thicknessNm: new Float32Array(width * height).fill(found ? 500 : NaN),
    confidence: new Float32Array(width * height),
    status: new Uint8Array(width * height),
    fitted: FITTED,
    filmArea: found ? undefined : ({ found: false } as MapResult['filmArea']),
    lightEvenness: found ? { gainMin: 1, gainMax: ratio, pixelsUsed: width * height, logGainCoefficients: step } : null,
  } as unknown as MapResult;
}

/** A photo of `width` × `height` mid-grey pixels (the doubles do not read them). */
function grey(width: number, height: number): PhotoPixels {
  return floatPixels(new Float32Array(width * height * 3).fill(0.5));
}

const STEP = [0.1, -0.2, 0, 0, 0, 0, 0];

function job(roundsFindFilm: boolean) {
  const calls: string[] = [];
  let previewMaps = 0;
  const preview: LightFieldPreview<MapResult> = {
    rgb: grey(40, 30),
    width: 40,
    height: 30,
    // The first map on the preview sees uneven light; after that, the light is even.
    mapWith: () => {
      calls.push('preview');
      return previewMaps++ === 0 ? fakeMap(40, 30, true, 1.3, STEP) : fakeMap(40, 30, true, 1.01, [0, 0, 0, 0, 0, 0, 0]);
    },
    rounds: {
      rgb: grey(20, 15),
      width: 20,
      height: 15,
      mapWith: () => {
        calls.push('rounds');
        return roundsFindFilm ? fakeMap(20, 15, true, 1.01, [0, 0, 0, 0, 0, 0, 0]) : fakeMap(20, 15, false, 1, []);
      },
    },
  };
  const run = mapWithLightField<MapResult, MapResult>({
    rgb: grey(400, 300),
    width: 400,
    height: 300,
    mapWith: () => {
      calls.push('full');
      return fakeMap(400, 300, true, 1.01, [0, 0, 0, 0, 0, 0, 0]);
    },
    mode: 'auto',
    preview,
  });
  return { calls, run };
}

describe('the light field on a large photo: first map on the preview, rounds on a coarser copy', () => {
  it('the rounds map the coarser copy, and the full photo is mapped once, evened by the field found', () => {
    const { calls, run } = job(true);
    expect(calls).toEqual(['preview', 'rounds', 'full']);
    // One round: the first map's step taken 1.5 times (over-relaxation).
    expect(run.field).not.toBeNull();
    expect(run.field?.logGainCoefficients[1]).toBeCloseTo(1.5 * STEP[1], 12);
    expect(run.field?.rounds).toBe(1);
  });

  it('a round whose copy loses the film is mapped again on the preview, and the field is still found', () => {
    const { calls, run } = job(false);
    expect(calls).toEqual(['preview', 'rounds', 'preview', 'full']);
    expect(run.field).not.toBeNull();
    expect(run.field?.logGainCoefficients[1]).toBeCloseTo(1.5 * STEP[1], 12);
  });
});
