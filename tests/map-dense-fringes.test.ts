/**
 * Fringes too dense for the photo's resolution (src/map/denseFringes.ts): the limit is a quarter of
 * a fringe period per pixel (sampling theorem: two samples per period, and 4:2:0 JPEG chroma at
 * half resolution; common practice).
 *
 * 1. The count on a hand-made map (worked by hand in the comment below).
 * 2. ROUND TRIP THROUGH OUR OWN MODEL: the bundled demo's INVENTED draining film
 *    (scripts/make-demo.js), whose film climbs steeply at the frame's sides. At 320 × 240 px
 *    (frame 4) that climb is 30–65 nm per pixel, beyond a quarter of the soap film's ~206 nm
 *    period: the map warns in plain words. At 816 × 612 px (frame 8) the same film is resolved and
 *    there is no warning. Measured before this check (truth against map): 1.7 % gross errors
 *    (> 50 nm) at 320 × 240, nearly all at the sides, against 0.05 % at 816 × 612.
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { denseFringePixels, denseFringeWarning } from '../src/map/denseFringes.js';
import { readPhotoBytes } from '../src/io/readPhoto.js';
import { mapDecodedPhoto } from '../src/map/mapPhoto.js';
import { resolveStack } from '../src/optics/index.js';
import { renderDemoFrame } from '../scripts/make-demo.js';

async function mapDemo(frame: number, width: number, height: number) {
  const { image } = renderDemoFrame(frame, width, height) as { image: { data: Uint8Array } };
  const jpeg = await sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.byteLength), { raw: { width, height, channels: 3 } })
    .jpeg({ quality: 90, chromaSubsampling: '4:2:0' })
    .toBuffer();
  const photo = await readPhotoBytes(new Uint8Array(jpeg), 'demo.jpg');
  return mapDecodedPhoto(photo, { stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 100, maxThicknessNm: 2000, threads: 1 }, null, 'demo.jpg');
}

const DENSE = /too dense for the photo's resolution/;

describe('fringes too dense for the photo', () => {
  it('counts the pixels at steps over the limit, each once, across rows and columns, skipping unmeasured pixels', () => {
    // Limit 10 nm.        steps over 10 nm:
    //   0   5  30  31     (1,0)-(2,0) across
    //   0   5 NaN  31     (1,1)-(1,2) down
    //   0  20  20  31     (0,2)-(1,2) across, (2,2)-(3,2) across (11 nm)
    // Dense: (1,0) (2,0) (1,1) (1,2) (0,2) (2,2) (3,2) = 7 of 11 measured.
    const map = Float32Array.from([0, 5, 30, 31, 0, 5, NaN, 31, 0, 20, 20, 31]);
    expect(denseFringePixels(map, 4, 3, 10)).toEqual({ dense: 7, measured: 11 });
    expect(denseFringePixels(map, 4, 3, 30)).toEqual({ dense: 0, measured: 11 });
    // A smooth ramp of 60 nm per pixel: past a quarter of a 206 nm period (51.5 nm), within a quarter of 400 nm.
    const ramp = Float32Array.from({ length: 20 }, (_, i) => 60 * (i % 10));
    expect(denseFringeWarning(ramp, 10, 2, 206)).toMatch(DENSE);
    expect(denseFringeWarning(ramp, 10, 2, 400)).toBeNull();
  });

  it('warns on the demo film at 320 × 240 (steep sides past a quarter period per pixel), not at 816 × 612', async () => {
    const small = await mapDemo(4, 320, 240);
    expect(small.warnings.some((w) => DENSE.test(w))).toBe(true);
    const large = await mapDemo(8, 816, 612);
    expect(large.warnings.some((w) => DENSE.test(w))).toBe(false);
  }, 120_000);
});
