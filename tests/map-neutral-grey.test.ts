/**
 * The neutral-grey curve of the film area's attachment rule (src/map/neutralGrey.ts): the colours
 * a spectrally flat reflector gives under the fitted photo formation, and which cell colours a
 * grey explains within an allowance.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { markGreyExplained, predictGreyCurve } from '../src/map/neutralGrey.js';
import type { ColourTable } from '../src/map/colourTable.js';

const table: ColourTable = { startNm: 0, stepNm: 1, count: 1, rgbLinear: new Float64Array(3), encoding: 'srgb' };
const identity = { exposure: 1, whiteBalance: [1, 1, 1] as [number, number, number], flare: [0, 0, 0] as [number, number, number] };

describe('neutral grey curve', () => {
  it('under exposure 1, no flare, balanced camera: each grey is R = G = B at the sRGB encoding of its reflectance (IEC 61966-2-1:1999, 0.5 → 0.7354)', () => {
    const curve = predictGreyCurve(table, identity, null);
    expect(curve.length).toBe(256 * 3);
    // level 0 is black, level 255 white; the sRGB encoding of 0.5 linear is 1.055·0.5^(1/2.4) − 0.055 = 0.73536.
    expect(curve[0]).toBeCloseTo(0, 6);
    expect(curve[255 * 3]).toBeCloseTo(1, 5);
    const i = Math.round(0.5 * 255);
    const k = i / 255;
    const encoded = 1.055 * k ** (1 / 2.4) - 0.055;
    for (let ch = 0; ch < 3; ch++) expect(curve[i * 3 + ch]).toBeCloseTo(encoded, 4);
    expect(1.055 * 0.5 ** (1 / 2.4) - 0.055).toBeCloseTo(0.73536, 4);
  });

  it('a grey cell is explained, a saturated colour is not; white balance tints the curve (a grey under a wrong balance is not grey in the photo)', () => {
    const curve = predictGreyCurve(table, identity, null);
    const cells = new Float32Array([0.5, 0.5, 0.5, 0.8, 0.3, 0.2]);
    const out = markGreyExplained(cells, new Uint8Array([1, 1]), curve, 3 * (4 / 255) ** 2, new Uint8Array(2));
    expect(Array.from(out)).toEqual([1, 0]);
    const warm = predictGreyCurve(table, { ...identity, whiteBalance: [1.3, 1, 0.7] }, null);
    expect(Array.from(markGreyExplained(cells, new Uint8Array([1, 1]), warm, 3 * (4 / 255) ** 2, new Uint8Array(2)))[0]).toBe(0);
    // Unselected cells stay 0.
    expect(Array.from(markGreyExplained(cells, new Uint8Array([0, 0]), curve, 1, new Uint8Array(2)))).toEqual([0, 0]);
  });

  it('the coarse-to-fine search agrees with an exhaustive search of the curve (random colours and allowances)', () => {
    const curve = predictGreyCurve(table, { exposure: 1.3, whiteBalance: [1.1, 1, 0.9], flare: [0.01, 0.01, 0.012] }, null);
    fc.assert(
      fc.property(fc.float({ min: 0, max: 1, noNaN: true }), fc.float({ min: 0, max: 1, noNaN: true }), fc.float({ min: 0, max: 1, noNaN: true }), fc.float({ min: Math.fround(1e-5), max: Math.fround(0.01), noNaN: true }), (r, g, b, allowance) => {
        let best = Infinity;
        for (let i = 0; i < 256; i++) best = Math.min(best, (r - curve[i * 3]) ** 2 + (g - curve[i * 3 + 1]) ** 2 + (b - curve[i * 3 + 2]) ** 2);
        // Colours right at the allowance may round either way.
        fc.pre(Math.abs(best - allowance) > 1e-6);
        const out = markGreyExplained(new Float32Array([r, g, b]), new Uint8Array([1]), curve, allowance, new Uint8Array(1));
        expect(out[0]).toBe(best <= allowance ? 1 : 0);
      }),
      { numRuns: 2000 },
    );
  });
});
