/**
 * `fullSizeFirst` (MapOptions; a series sets it for a frame after an evenly lit one): a large photo
 * is mapped at full size first, and its light field is fitted on a preview only when that map
 * finds the light uneven. An identity of the design, on a scene of our own: frame 8 of the bundled
 * demo's INVENTED draining film (scripts/make-demo.js) at 1,200 × 900 px (over the 1-MP preview
 * threshold), as a JPEG (quality 90, 4:2:0), evenly lit and under the benchmark's uneven light
 * (bench/camera-effects.js UNEVEN_LIGHT: 35 % fall-off times 25 % cos⁴ vignetting, applied in
 * linear light). Counted through `onPhase`: each map (preview or full size) starts one 'fit' phase.
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { decodeSrgb, encodeSrgb } from '../src/colour/srgb.js';
import { readPhotoBytes } from '../src/io/readPhoto.js';
import { mapDecodedPhoto } from '../src/map/mapPhoto.js';
import type { MapOptions } from '../src/map/types.js';
import { resolveStack } from '../src/optics/index.js';
import { renderDemoFrame } from '../scripts/make-demo.js';
import { UNEVEN_LIGHT, unevenLight } from '../bench/camera-effects.js';

const W = 1200;
const H = 900;

async function photoOf(uneven: boolean) {
  const { image, thicknessNm } = renderDemoFrame(8, W, H) as { image: { data: Uint8Array }; thicknessNm: Float32Array };
  const data = new Uint8Array(image.data.length);
  const linear = Float64Array.from({ length: 256 }, (_, c) => decodeSrgb(c / 255));
  const { gain } = unevenLight(W, H, UNEVEN_LIGHT);
  for (let p = 0, i = 0; p < W * H; p++, i += 3) {
    for (let c = 0; c < 3; c++) data[i + c] = uneven ? Math.round(encodeSrgb(Math.min(1, linear[image.data[i + c]] * gain[p])) * 255) : image.data[i + c];
  }
  const jpeg = await sharp(Buffer.from(data.buffer), { raw: { width: W, height: H, channels: 3 } }).jpeg({ quality: 90, chromaSubsampling: '4:2:0' }).toBuffer();
  return { photo: await readPhotoBytes(new Uint8Array(jpeg), 'frame.jpg'), truth: thicknessNm };
}

function mapCounting(photo: Awaited<ReturnType<typeof photoOf>>['photo'], extra: Partial<MapOptions>) {
  let fits = 0;
  const options: MapOptions = {
    stack: resolveStack('soap-film'),
    angleRad: 0,
    light: 'D65',
    thinBelowNm: 50,
    maxThicknessNm: 2000,
    threads: 1,
    ownFit: true,
    onPhase: (phase) => {
      if (phase === 'fit') fits++;
    },
    ...extra,
  };
  const result = mapDecodedPhoto(photo, options, null, 'frame.jpg');
  return { result, fits };
}

function grossShare(thicknessNm: Float32Array, truth: Float32Array): number {
  let measured = 0;
  let gross = 0;
  for (let i = 0; i < truth.length; i++) {
    if (!Number.isFinite(thicknessNm[i])) continue;
    measured++;
    if (Math.abs(thicknessNm[i] - truth[i]) > 50) gross++;
  }
  return gross / measured;
}

describe('a large photo mapped at full size first (a series frame after an evenly lit one)', () => {
  it('evenly lit: one map, no preview, and the same accuracy as through the preview', async () => {
    const { photo, truth } = await photoOf(false);
    const first = mapCounting(photo, { fullSizeFirst: true });
    const viaPreview = mapCounting(photo, {});
    expect(first.fits).toBe(1);
    expect(viaPreview.fits).toBe(2);
    expect(first.result.exposureField).toBeNull();
    // Targets of the accuracy benchmark (bench/accuracy.js): gross errors (> 50 nm) ≤ 1 %.
    expect(grossShare(first.result.thicknessNm, truth)).toBeLessThan(0.01);
    expect(Math.abs(grossShare(first.result.thicknessNm, truth) - grossShare(viaPreview.result.thicknessNm, truth))).toBeLessThan(0.002);
  }, 120_000);

  it('unevenly lit: the full-size map finds the light uneven, and the field is fitted on the preview as for any large photo', async () => {
    const { photo, truth } = await photoOf(true);
    const first = mapCounting(photo, { fullSizeFirst: true });
    // The full-size map, the preview's first map and its rounds, the full map evened.
    expect(first.fits).toBeGreaterThanOrEqual(3);
    expect(first.result.exposureField?.source).toBe('photo');
    expect(grossShare(first.result.thicknessNm, truth)).toBeLessThan(0.01);
  }, 120_000);
});
