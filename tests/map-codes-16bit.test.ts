/**
 * 16-bit photos are kept as their 16-bit codes (src/io/photoCodes.ts, src/map/photoPixels.ts), as
 * 8-bit photos are kept as theirs: a 12-MP 16-bit TIFF is then 72 MB instead of 144 MB of floats.
 * This must not change a single number, so everything here is an identity of the design checked
 * byte for byte against the definition (a code's value is code / 65535 rounded to float32, common
 * practice for normalised 16-bit samples) or against the same photo held as floats:
 *
 * - a whole map of a 16-bit photo, evenly and unevenly lit, read as codes and as floats, with one
 *   thread and two;
 * - the evening of the light field (src/map/evenOutLight.ts) on 16-bit codes and on floats;
 * - the clipping threshold's code (`firstCodeAtLeast`) against a plain scan of the levels;
 * - video frames (`photoFromRaw`, FFmpeg's rgb24 / rgb48le bytes) against the definition.
 *
 * The scene is frame 8 of the bundled demo's draining film (scripts/make-demo.js
 * `renderDemoFrame`, an INVENTED drainage scenario of our own rendered by our own forward model),
 * widened to 16 bits by a resize (so values fall between the 8-bit levels, as a 16-bit camera's
 * do) and, for the uneven copy, lit with the bench's fall-off (bench/camera-effects.js).
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { readPhotoBytes } from '../src/io/readPhoto.js';
import { photoFromRaw } from '../src/io/photoFromRaw.js';
import { levels16Table } from '../src/io/codeLevels.js';
import { mapDecodedPhoto } from '../src/map/mapPhoto.js';
import { evenOutLight } from '../src/map/evenOutLight.js';
import { codePixels, firstCodeAtLeast, floatPixels, pixelFloats, pixelsOfPhoto, sharedPixels, valueAt } from '../src/map/photoPixels.js';
import { resolveStack } from '../src/optics/index.js';
import { decodeSrgb, encodeSrgb } from '../src/colour/srgb.js';
import { renderDemoFrame } from '../scripts/make-demo.js';
import { UNEVEN_LIGHT, unevenLight } from '../bench/camera-effects.js';

function bytes(values: Float32Array | Uint8Array): Buffer {
  return Buffer.from(values.buffer, values.byteOffset, values.byteLength);
}

/** The demo frame as a 16-bit TIFF, resized to `width` in 16 bits, optionally unevenly lit. */
async function sixteenBitFrame(width: number, uneven: boolean): Promise<Buffer> {
  const W = 480;
  const H = 360;
  const { image } = renderDemoFrame(8, W, H);
  const { data, info } = await sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.byteLength), { raw: { width: W, height: H, channels: 3 } })
    .toColourspace('rgb16')
    .resize(width)
    .raw({ depth: 'ushort' })
    .toBuffer({ resolveWithObject: true });
  const samples = new Uint16Array(data.buffer, data.byteOffset, data.byteLength / 2);
  if (uneven) {
    const { gain } = unevenLight(info.width, info.height, UNEVEN_LIGHT);
    for (let p = 0, i = 0; p < gain.length; p++, i += 3) {
      for (let c = 0; c < 3; c++) samples[i + c] = Math.round(Math.min(1, encodeSrgb(decodeSrgb(samples[i + c] / 65535) * gain[p])) * 65535);
    }
  }
  return sharp(samples, { raw: { width: info.width, height: info.height, channels: 3 } })
    .toColourspace('rgb16')
    .tiff({ compression: 'lzw' })
    .toBuffer();
}

describe('16-bit photos kept as their codes', () => {
  const options = { stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000 };

  for (const uneven of [false, true]) {
    it(`maps a${uneven ? 'n unevenly lit' : ''} 16-bit TIFF read as codes byte-identically to the same photo held as floats, with 1 and 2 threads`, async () => {
      const tiff = await sixteenBitFrame(457, uneven);
      const photo = await readPhotoBytes(new Uint8Array(tiff), 'frame16.tif');
      expect(photo.bitDepth).toBe(16);
      expect(photo.codes).toBeInstanceOf(Uint16Array);
      // Values between the 8-bit levels: a 16-bit photo, not an 8-bit one widened.
      const codes = photo.codes!;
      let offLevel = 0;
      for (let k = 0; k < codes.length; k++) if (codes[k] % 257 !== 0) offLevel++;
      expect(offLevel / codes.length).toBeGreaterThan(0.9);
      const one = mapDecodedPhoto(photo, { ...options, threads: 1 }, null, 'frame16.tif');
      const two = mapDecodedPhoto(photo, { ...options, threads: 2 }, null, 'frame16.tif');
      // Reading the floats drops the codes: the same photo, held as floats.
      const floats = photo.rgb;
      expect(photo.codes).toBeUndefined();
      expect(Array.from(floats.subarray(0, 300))).toEqual(Array.from(codes.subarray(0, 300), (v) => Math.fround(v / 65535)));
      const asFloats = mapDecodedPhoto(photo, { ...options, threads: 1 }, null, 'frame16.tif');
      expect(one.stats.coverage).toBeGreaterThan(0.7);
      if (uneven) expect(one.exposureField).not.toBeNull();
      for (const other of [two, asFloats]) {
        expect(bytes(other.thicknessNm).equals(bytes(one.thicknessNm))).toBe(true);
        expect(bytes(other.confidence).equals(bytes(one.confidence))).toBe(true);
        expect(bytes(other.status).equals(bytes(one.status))).toBe(true);
        expect(other.stats).toEqual(one.stats);
      }
    }, 180_000);
  }

  it('evens 16-bit codes to the same floats as the same photo held as floats (with and without a picture style)', () => {
    const width = 300;
    const height = 40;
    const codes = new Uint16Array(width * height * 3);
    for (let i = 0; i < codes.length; i++) codes[i] = Math.round(32768 + 30000 * Math.sin(i / 97 + (i % 3)));
    const floats = pixelFloats(codePixels(codes));
    expect(floats[7]).toBe(Math.fround(codes[7] / 65535));
    const field = [0.05, -0.35, 0.08, -0.06, 0.04, -0.05, -0.2];
    for (const response of [null, { contrast: 0.35, gamma: 0.92, saturation: 1.25 }]) {
      const fromCodes = evenOutLight(codePixels(codes), width, height, field, [0.008, 0.007, 0.006], [-0.3, 0.3], response, false);
      const fromFloats = evenOutLight(floatPixels(floats), width, height, field, [0.008, 0.007, 0.006], [-0.3, 0.3], response, false);
      expect(fromCodes.codes).toBeNull();
      expect(bytes(fromCodes.values).equals(bytes(fromFloats.values))).toBe(true);
    }
  });

  it('the first code at or above a value is the plain scan of the 16-bit levels, and shared copies stay 16-bit', () => {
    const levels = levels16Table();
    expect(levels.length).toBe(65536);
    for (const value of [0, 1e-9, 0.5, 0.999, 0.99999, Math.fround(40000 / 65535), 1, 1.5]) {
      let scan = 0;
      while (scan < levels.length && levels[scan] < value) scan++;
      expect(firstCodeAtLeast(levels, value), String(value)).toBe(scan);
    }
    const pixels = codePixels(Uint16Array.from([1, 2, 65535]));
    const shared = sharedPixels(pixels);
    expect(shared.codes).toBeInstanceOf(Uint16Array);
    expect(shared.codes!.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(Array.from(shared.codes!)).toEqual([1, 2, 65535]);
    expect(valueAt(shared, 2)).toBe(1);
  });

  it('video frames (raw rgb24 and little-endian rgb48) are kept as codes whose values are code/255 and code/65535', () => {
    const eight = Buffer.from([0, 128, 255, 7, 7, 7]);
    const photo8 = photoFromRaw(eight, 2, 1, 8, 'video/test');
    expect(photo8.codes).toBeInstanceOf(Uint8Array);
    expect(photo8.isGrey).toBe(false);
    expect(Array.from(pixelFloats(pixelsOfPhoto(photo8)))).toEqual([0, 128, 255, 7, 7, 7].map((v) => Math.fround(v / 255)));
    const deep = [0, 1, 65535, 300, 300, 300];
    const le = Buffer.alloc(12);
    deep.forEach((v, k) => le.writeUInt16LE(v, 2 * k));
    const photo16 = photoFromRaw(le, 2, 1, 16, 'video/test');
    expect(photo16.codes).toBeInstanceOf(Uint16Array);
    expect(Array.from(photo16.rgb)).toEqual(deep.map((v) => Math.fround(v / 65535)));
    expect(photoFromRaw(Buffer.from([9, 9, 9]), 1, 1, 8, 'video/test').isGrey).toBe(true);
    expect(() => photoFromRaw(Buffer.alloc(5), 1, 1, 8, 'video/test')).toThrow(/expected 3/);
  });
});
