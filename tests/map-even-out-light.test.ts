// Dividing a smooth exposure field out of a photo (src/map/evenOutLight.ts) against the same
// chain written out with the exact formulas, value by value: the sRGB transfer functions of
// IEC 61966-2-1:1999 (src/colour/srgb.ts), the tone curve and saturation about BT.601 luma
// (src/colour/toneResponse.ts, its formula, not its tables), exp of the log-gain surface. The
// fast path reads tables, interpolates the gain between exact columns and lets a pixel of its
// left neighbour's colour take the neighbour's result; these checks bound what that costs.
import { describe, expect, it } from 'vitest';
import { decodeSrgb, encodeSrgb } from '../src/colour/srgb.js';
import { type CameraResponse, LUMA_BT601, toneAt } from '../src/colour/toneResponse.js';
import { evenOutLight } from '../src/map/evenOutLight.js';
import { codePixels, floatPixels, pixelFloats } from '../src/map/photoPixels.js';

/** The exact chain for one pixel (the reference): T⁻¹ found by bisection of the formula. */
function exactPixel(rgb: readonly number[], gain: number, flare: readonly number[], response: CameraResponse | null): number[] {
  const invertTone = (value: number): number => {
    if (!response) return value;
    let lo = 0;
    let hi = 1;
    for (let k = 0; k < 60; k++) {
      const mid = (lo + hi) / 2;
      if (toneAt(mid, response.contrast, response.gamma) < value) lo = mid;
      else hi = mid;
    }
    return (lo + hi) / 2;
  };
  const clamp = (v: number): number => (v < 0 ? 0 : v > 1 ? 1 : v);
  const [lr, lg, lb] = LUMA_BT601;
  const s = response ? response.saturation : 1;
  const luma = lr * rgb[0] + lg * rgb[1] + lb * rgb[2];
  const before = rgb.map((v) => invertTone(clamp(luma + (v - luma) / s)));
  const evened = before.map((e, c) => encodeSrgb(clamp((decodeSrgb(e) - flare[c]) / gain + flare[c])));
  if (!response) return evened.map(clamp);
  const toned = evened.map((e) => toneAt(e, response.contrast, response.gamma));
  const luma2 = lr * toned[0] + lg * toned[1] + lb * toned[2];
  return toned.map((t) => clamp(luma2 + s * (t - luma2)));
}

/** evenOutLight on a photo held as floats, its result as floats (../src/map/photoPixels.ts). */
function evenedFloats(photo: Float32Array, ...rest: DropFirst<Parameters<typeof evenOutLight>>): Float32Array {
  return pixelFloats(evenOutLight(floatPixels(photo), ...rest));
}
type DropFirst<T extends unknown[]> = T extends [unknown, ...infer R] ? R : never;

/** An 8-bit photo of smooth colour bands, lifted in blocks, with runs of repeated colours (as a film's photo has). */
function bandedPhoto(width: number, height: number): Float32Array {
  const rgb = new Float32Array(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const phase = (x + 0.7 * y) / 700;
      for (let c = 0; c < 3; c++) {
        const v = 0.5 + 0.42 * Math.sin(phase * (1 + 0.3 * c) + c) + (((x >> 3) * 7 + y) % 5 === c ? 0.006 : 0);
        rgb[(y * width + x) * 3 + c] = Math.round(Math.min(1, Math.max(0, v)) * 255) * (1 / 255);
      }
    }
  }
  return rgb;
}

// A strong field: 35 % fall-off across the photo with r⁴ vignetting (the hardest light).
const FIELD = [0.05, -0.35, 0.08, -0.06, 0.04, -0.05, -0.2];
const FLARE = [0.008, 0.007, 0.006];
const STYLE: CameraResponse = { contrast: 0.35, gamma: 0.92, saturation: 1.25 };

function gainAt(x: number, y: number, width: number, height: number): number {
  const half = Math.max(width, height) / 2;
  const u = (x + 0.5 - width / 2) / half;
  const v = (y + 0.5 - height / 2) / half;
  const r2 = u * u + v * v;
  const c = FIELD;
  return Math.exp(c[0] + c[1] * u + c[2] * v + c[3] * u * u + c[4] * u * v + c[5] * v * v + c[6] * r2 * r2);
}

describe('evenOutLight against the exact formulas (IEC 61966-2-1 sRGB, the tone-curve formula)', () => {
  // 2048 pixels wide: the gain is interpolated over 8 columns, and the field changes by about
  // 3e-4 per column, so some repeated colours take their neighbour's result and some do not.
  const width = 2048;
  const height = 40;
  const photo = bandedPhoto(width, height);

  it('the scene repeats colours along rows, as the photo of a film does (the shortcut is exercised)', () => {
    let same = 0;
    for (let i = 3; i < photo.length; i += 3) if (photo[i] === photo[i - 3] && photo[i + 1] === photo[i - 2] && photo[i + 2] === photo[i - 1]) same++;
    expect(same / (width * height)).toBeGreaterThan(0.3);
  });

  for (const response of [null, STYLE]) {
    const name = response ? 'with a picture style' : 'without a response';
    it(`${name}: continuous output within 2e-4 of the exact chain at every pixel`, () => {
      const evened = evenedFloats(photo, width, height, FIELD, FLARE, null, response, false);
      let worst = 0;
      for (let y = 0; y < height; y++) {
        for (let x = 0; x < width; x++) {
          const i = (y * width + x) * 3;
          const exact = exactPixel([photo[i], photo[i + 1], photo[i + 2]], gainAt(x, y, width, height), FLARE, response);
          for (let c = 0; c < 3; c++) worst = Math.max(worst, Math.abs(evened[i + c] - exact[c]));
        }
      }
      expect(worst).toBeLessThan(2e-4);
      // Not trivially equal to the photo: the field moved the values.
      let moved = 0;
      for (let i = 0; i < photo.length; i++) moved = Math.max(moved, Math.abs(evened[i] - photo[i]));
      expect(moved).toBeGreaterThan(0.05);
    });

    it(`${name}: on 8-bit codes, every value within one code of the exact chain rounded, 99 % on it`, () => {
      const evened = evenedFloats(photo, width, height, FIELD, FLARE, null, response, true);
      let off = 0;
      let worst = 0;
      for (let y = 0; y < height; y++) {
        for (let x = 0; x < width; x++) {
          const i = (y * width + x) * 3;
          const exact = exactPixel([photo[i], photo[i + 1], photo[i + 2]], gainAt(x, y, width, height), FLARE, response);
          for (let c = 0; c < 3; c++) {
            const code = evened[i + c] * 255;
            expect(Math.abs(code - Math.round(code))).toBeLessThan(1e-3);
            const d = Math.abs(Math.round(code) - Math.round(exact[c] * 255));
            worst = Math.max(worst, d);
            if (d > 0) off++;
          }
        }
      }
      expect(worst).toBeLessThanOrEqual(1);
      expect(off).toBeLessThan(0.01 * photo.length);
    });
  }

  it('a flat field with no flare and no response gives an 8-bit photo back unchanged', () => {
    const evened = evenedFloats(photo, width, height, [0, 0, 0, 0, 0, 0, 0], [0, 0, 0], null, null, true);
    expect(Array.from(evened)).toEqual(Array.from(photo));
  });

  it('an 8-bit photo read as its codes is evened to the same values as the same photo held as floats', () => {
    const codes = Uint8Array.from(photo, (v) => Math.round(v * 255));
    expect(pixelFloats(codePixels(codes))).toEqual(photo);
    for (const response of [null, STYLE]) {
      for (const eightBit of [false, true]) {
        const fromCodes = evenOutLight(codePixels(codes), width, height, FIELD, FLARE, [-0.3, 0.3], response, eightBit);
        const fromFloats = evenOutLight(floatPixels(photo), width, height, FIELD, FLARE, [-0.3, 0.3], response, eightBit);
        // Put back on codes, the result is held as codes; otherwise as floats.
        expect(fromCodes.codes !== null).toBe(eightBit);
        expect(pixelFloats(fromCodes)).toEqual(pixelFloats(fromFloats));
      }
    }
  });

  it('the clamp holds the log gain within its range', () => {
    // Clamped to [0, 0]: no gain at all anywhere, whatever the surface says.
    const evened = evenedFloats(photo, width, height, FIELD, [0, 0, 0], [0, 0], null, true);
    expect(Array.from(evened)).toEqual(Array.from(photo));
  });
});
