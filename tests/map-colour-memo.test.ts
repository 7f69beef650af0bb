/**
 * The pixel pass's colour memo (src/map/pixelPass.ts, `ColourMemo`) must not change a single
 * number: the memoised pass is compared byte for byte with the pass that computes every pixel
 * afresh (`memo: null`). This is an identity of the design, not physics.
 *
 * 1. A realistic scene: frame 8 of the bundled demo's draining film (scripts/make-demo.js
 *    `renderDemoFrame`, an INVENTED drainage scenario of our own rendered by our own forward
 *    model, i.e. a round trip through our own model), encoded as a 4:2:0 JPEG by sharp and decoded
 *    back. The same decoded photo is mapped as an 8-bit photo (memo) and declared 16-bit (the only
 *    effect of the bit depth on the map is to switch the memo off).
 * 2. A constructed table (a helix in the colour cube whose basins are 150 steps wide) on which
 *    many downhill walks run out of steps (MAX_WALK) before reaching a minimum, with colours that
 *    repeat at many reference positions, so the memo's hits, widenings, replacements and
 *    unfinished walks all occur; scoring is compared too.
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { readPhotoBytes } from '../src/io/readPhoto.js';
import { createCandidateCube } from '../src/map/candidateCube.js';
import { createMatchScratch, MAX_WALK, walkDownhill } from '../src/map/matchColour.js';
import { mapDecodedPhoto } from '../src/map/mapPhoto.js';
import { createColourMemo, matchPixelRows, releaseColourMemo, scorePixelRows, type PixelPassInput, type PixelPassOutput } from '../src/map/pixelPass.js';
import { PixelStatus } from '../src/map/types.js';
import { resolveStack } from '../src/optics/index.js';
import { renderDemoFrame } from '../scripts/make-demo.js';
import { codePixels, floatPixels, pixelFloats } from '../src/map/photoPixels.js';

function bytes(values: Float32Array | Uint8Array): Buffer {
  return Buffer.from(values.buffer, values.byteOffset, values.byteLength);
}

describe('colour memo of the pixel pass', () => {
  it('maps a JPEG of the demo film to byte-identical thickness, confidence and status with and without the memo', async () => {
    const W = 480;
    const H = 360;
    const { image } = renderDemoFrame(8, W, H);
    const jpeg = await sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.byteLength), { raw: { width: W, height: H, channels: 3 } })
      .jpeg({ quality: 90, chromaSubsampling: '4:2:0' })
      .toBuffer();
    const photo = await readPhotoBytes(new Uint8Array(jpeg), 'demo-frame.jpg');
    expect(photo.bitDepth).toBe(8);
    // The reader kept the JPEG's 8-bit codes, which the mapper reads (../src/map/photoPixels.ts).
    expect(photo.codes).toBeInstanceOf(Uint8Array);
    const options = { stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000, threads: 1 };
    const remembered = mapDecodedPhoto(photo, options, null, 'demo-frame.jpg');
    const afresh = mapDecodedPhoto({ ...photo, bitDepth: 16 }, options, null, 'demo-frame.jpg');
    // The same photo held as floats (reading them drops the codes), its memo keyed by the
    // values, gives the same map.
    expect(photo.codes).toBeUndefined();
    const asFloats = mapDecodedPhoto({ ...photo, codes: undefined }, options, null, 'demo-frame.jpg');
    expect(bytes(asFloats.thicknessNm).equals(bytes(remembered.thicknessNm))).toBe(true);
    expect(bytes(asFloats.confidence).equals(bytes(remembered.confidence))).toBe(true);
    expect(bytes(asFloats.status).equals(bytes(remembered.status))).toBe(true);
    expect(remembered.stats.coverage).toBeGreaterThan(0.8);
    expect(bytes(remembered.thicknessNm).equals(bytes(afresh.thicknessNm))).toBe(true);
    expect(bytes(remembered.confidence).equals(bytes(afresh.confidence))).toBe(true);
    expect(bytes(remembered.status).equals(bytes(afresh.status))).toBe(true);
    expect(remembered.stats).toEqual(afresh.stats);
    expect(remembered.ambiguousReasons).toEqual(afresh.ambiguousReasons);
  }, 120_000);

  it('gives the same arrays as the pass without memo where walks run out of steps, in one band or two', () => {
    const scene = helixScene();
    // The scene really holds walks that stop at MAX_WALK, and walks that finish.
    let cut = 0;
    let finished = 0;
    for (let i = 0; i < scene.width * scene.height; i++) {
      const start = Math.round(scene.gridPosition[i]);
      if (!(start >= 0)) continue;
      const r = scene.rgb.values[i * 3];
      const g = scene.rgb.values[i * 3 + 1];
      const b = scene.rgb.values[i * 3 + 2];
      if (Math.abs(walkDownhill(scene.predictedRgb, scene.count, r, g, b, start) - start) === MAX_WALK) cut++;
      else finished++;
    }
    expect(cut).toBeGreaterThan(500);
    expect(finished).toBeGreaterThan(500);

    const reference = runPass(scene, null, [[0, scene.height]]);
    const memo = createColourMemo(scene.count)!;
    const oneBand = runPass(scene, memo, [[0, scene.height]]);
    // Colours: 40 exact 8-bit ones in the memo; the off-level ones are computed afresh.
    expect(memo.entries).toBe(40);
    const twoBands = runPass(scene, createColourMemo(scene.count), [
      [0, 37],
      [37, scene.height],
    ]);
    for (const run of [oneBand, twoBands]) {
      expect(run.counts).toEqual(reference.counts);
      expect(bytes(run.status).equals(bytes(reference.status))).toBe(true);
      expect(bytes(run.out.thicknessNm).equals(bytes(reference.out.thicknessNm))).toBe(true);
      expect(bytes(run.out.alternativeCost).equals(bytes(reference.out.alternativeCost))).toBe(true);
      expect(bytes(run.confidence).equals(bytes(reference.confidence))).toBe(true);
      expect(run.poor).toBe(reference.poor);
    }
    // Every outcome occurs: kept, unresolved, discontinuous, too thick, poor, and a finite margin.
    expect(reference.counts.unresolved).toBeGreaterThan(0);
    expect(reference.counts.discontinuous).toBeGreaterThan(0);
    expect(reference.status.some((s) => s === PixelStatus.tooThick)).toBe(true);
    expect(reference.status.some((s) => s === PixelStatus.ok)).toBe(true);
    expect(reference.poor).toBeGreaterThan(0);
    expect(reference.out.alternativeCost.some((c) => Number.isFinite(c))).toBe(true);
  });

  it('gives the same arrays for an 8-bit photo read as its codes as for the same photo held as floats', () => {
    const scene = helixScene();
    // The scene's colours put on 8-bit codes (its off-level pixels rounded to the nearest code).
    const codes = Uint8Array.from(scene.rgb.values, (v) => Math.round(v * 255));
    const asCodes = { ...scene, rgb: codePixels(codes) };
    const asFloats = { ...scene, rgb: floatPixels(pixelFloats(codePixels(codes))) };
    expect(asFloats.rgb.values[3]).toBe(Math.fround(codes[3] / 255));
    const reference = runPass(asFloats, null, [[0, scene.height]]);
    const floatMemo = createColourMemo(scene.count)!;
    const codeMemo = createColourMemo(scene.count)!;
    const viaValues = runPass(asFloats, floatMemo, [[0, scene.height]]);
    const viaCodes = runPass(asCodes, codeMemo, [
      [0, 37],
      [37, scene.height],
    ]);
    expect(codeMemo.entries).toBe(floatMemo.entries);
    for (const run of [viaValues, viaCodes]) {
      expect(run.counts).toEqual(reference.counts);
      expect(bytes(run.status).equals(bytes(reference.status))).toBe(true);
      expect(bytes(run.out.thicknessNm).equals(bytes(reference.out.thicknessNm))).toBe(true);
      expect(bytes(run.out.alternativeCost).equals(bytes(reference.out.alternativeCost))).toBe(true);
      expect(bytes(run.confidence).equals(bytes(reference.confidence))).toBe(true);
    }
    expect(reference.status.some((s) => s === PixelStatus.ok)).toBe(true);
  });

  it('gives the same arrays with a memo made from the buffers an earlier pass on another table released', () => {
    const scene = helixScene();
    const reference = runPass(scene, null, [[0, scene.height]]);
    // An earlier pass on another table (the helix read 37 steps further on) fills a memo with
    // entries of its own; its buffers are handed back and taken up by the next memo.
    const shifted = new Float32Array(scene.predictedRgb.length);
    for (let i = 0; i < scene.count; i++) for (let c = 0; c < 3; c++) shifted[i * 3 + c] = scene.predictedRgb[((i + 37) % scene.count) * 3 + c];
    const earlier = createColourMemo(scene.count)!;
    runPass({ ...scene, predictedRgb: shifted }, earlier, [[0, scene.height]]);
    expect(earlier.entries).toBe(40);
    const { slots, ints, reals } = earlier;
    releaseColourMemo(earlier);
    const reused = createColourMemo(scene.count)!;
    expect(reused.slots).toBe(slots);
    expect(reused.ints).toBe(ints);
    expect(reused.reals).toBe(reals);
    expect(reused.entries).toBe(0);
    const run = runPass(scene, reused, [[0, scene.height]]);
    expect(reused.entries).toBe(40);
    expect(run.counts).toEqual(reference.counts);
    expect(bytes(run.status).equals(bytes(reference.status))).toBe(true);
    expect(bytes(run.out.thicknessNm).equals(bytes(reference.out.thicknessNm))).toBe(true);
    expect(bytes(run.out.alternativeCost).equals(bytes(reference.out.alternativeCost))).toBe(true);
    expect(bytes(run.confidence).equals(bytes(reference.confidence))).toBe(true);
    // A memo released and not taken up again leaves the next one fresh buffers.
    releaseColourMemo(reused);
    expect(createColourMemo(scene.count)!.slots).toBe(slots);
    expect(createColourMemo(scene.count)!.slots).not.toBe(slots);
  });

  it('scores each pixel as when scored alone, where pixels share a cost but not the margin or the noise bin', () => {
    // A column of pixels, so that each row scored on its own call gets a fresh score cache. 25
    // costs × 100 margins × 3 greys, each met about twice: more keys than the cache holds, so
    // keys that share a cost but not the margin (or the noise bin) meet in one slot.
    const height = 15000;
    const rgb = new Float32Array(height * 3);
    const cost = new Float32Array(height);
    const alternativeCost = new Float32Array(height);
    for (let y = 0; y < height; y++) {
      const key = (y * 7919) % 7500;
      const grey = [40, 130, 220][key % 3] / 255;
      rgb.fill(grey, y * 3, y * 3 + 3);
      cost[y] = 1e-5 * (1 + (Math.floor(key / 3) % 25)) ** 2;
      const margin = Math.floor(key / 75);
      alternativeCost[y] = margin === 99 ? Infinity : cost[y] + 1e-5 * margin;
    }
    const noise = { sigmaByLuma: new Float32Array(16).map((_, k) => 0.002 + 0.0007 * k), sigma: 0.004 };
    const score = (y0: number, y1: number, out: PixelPassOutput, status: Uint8Array) =>
      scorePixelRows({ rgb: floatPixels(rgb), width: 1, status, noise, medianCost: 2e-4, modelSlack: 3 * (2 / 255) ** 2 }, out, y0, y1);
    const together = { thicknessNm: new Float32Array(height), cost: cost.slice(), alternativeCost: alternativeCost.slice() };
    const togetherStatus = new Uint8Array(height);
    const poorTogether = score(0, height, together, togetherStatus);
    const alone = { thicknessNm: new Float32Array(height), cost: cost.slice(), alternativeCost: alternativeCost.slice() };
    const aloneStatus = new Uint8Array(height);
    let poorAlone = 0;
    for (let y = 0; y < height; y++) poorAlone += score(y, y + 1, alone, aloneStatus);
    expect(poorAlone).toBeGreaterThan(0);
    expect(poorTogether).toBe(poorAlone);
    expect(bytes(togetherStatus).equals(bytes(aloneStatus))).toBe(true);
    expect(bytes(together.cost).equals(bytes(alone.cost))).toBe(true);
    expect(new Set(alone.cost).size).toBeGreaterThan(3000);
  });
});

type Scene = Omit<PixelPassInput, 'cube' | 'memo' | 'status'> & { readonly status: Uint8Array };

/**
 * An invented table of 900 colours on a helix around the grey axis (period 150 steps, so each
 * colour's basins are ≈ 150 steps wide), and a 120 × 90 photo of 40 exact 8-bit colours plus
 * a few colours off the 8-bit levels, each pixel with its own reference position.
 */
function helixScene(): Scene {
  const count = 900;
  const period = 150;
  const predictedRgb = new Float32Array(count * 3);
  for (let i = 0; i < count; i++) {
    const angle = (2 * Math.PI * i) / period;
    const radius = 0.35 * (1 - i / (1.6 * count));
    predictedRgb[i * 3] = 0.5 + radius * Math.cos(angle);
    predictedRgb[i * 3 + 1] = 0.5 + radius * Math.sin(angle);
    predictedRgb[i * 3 + 2] = 0.2 + (0.6 * i) / count;
  }
  const width = 120;
  const height = 90;
  const pixels = width * height;
  let seed = 12345;
  const random = () => {
    seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
    return seed / 2 ** 32;
  };
  const palette: number[][] = [];
  for (let k = 0; k < 40; k++) {
    // A colour near the table at a random index, rounded to 8-bit levels.
    const at = Math.floor(random() * count);
    palette.push([0, 1, 2].map((c) => Math.round((predictedRgb[at * 3 + c] + 0.03 * (random() - 0.5)) * 255)));
  }
  const rgb = new Float32Array(pixels * 3);
  const gridPosition = new Float32Array(pixels);
  const status = new Uint8Array(pixels).fill(PixelStatus.ok);
  for (let i = 0; i < pixels; i++) {
    const colour = palette[Math.floor(random() * palette.length)];
    // One pixel in 20 is off the 8-bit levels (as after a linear camera's encoding).
    const off = i % 20 === 7 ? 0.3 : 0;
    for (let c = 0; c < 3; c++) rgb[i * 3 + c] = (colour[c] + off) / 255;
    gridPosition[i] = i % 50 === 3 ? NaN : random() * (count - 1);
    if (i % 97 === 5) status[i] = PixelStatus.dark;
  }
  const space = { matrix: Float64Array.from([0.8, 0.1, 0.1, 0.2, 0.6, 0.2, 0.1, 0.3, 0.6]), offset: new Float64Array(3) };
  return {
    rgb: floatPixels(rgb),
    width,
    height,
    status,
    gridPosition,
    block: 1,
    gridWidth: width,
    gridHeight: height,
    predictedRgb,
    count,
    space,
    pixelJump: 64.2,
    washoutIndex: 820,
    startNm: 20,
    stepNm: 1.5,
  };
}

function runPass(scene: Scene, memo: ReturnType<typeof createColourMemo>, bands: [number, number][]) {
  const pixels = scene.width * scene.height;
  const status = scene.status.slice();
  const input: PixelPassInput = { ...scene, status, cube: createCandidateCube(16, 4), memo };
  const out: PixelPassOutput = { thicknessNm: new Float32Array(pixels).fill(NaN), cost: new Float32Array(pixels), alternativeCost: new Float32Array(pixels) };
  const scratch = createMatchScratch(4);
  const counts = { unresolved: 0, discontinuous: 0 };
  for (const [y0, y1] of bands) {
    const part = matchPixelRows(input, out, scratch, y0, y1);
    counts.unresolved += part.unresolved;
    counts.discontinuous += part.discontinuous;
  }
  const noise = { sigmaByLuma: new Float32Array(16).map((_, k) => 0.002 + 0.0005 * k), sigma: 0.004 };
  let poor = 0;
  for (const [y0, y1] of bands) poor += scorePixelRows({ rgb: scene.rgb, width: scene.width, status, noise, medianCost: 2e-4, modelSlack: 3 * (2 / 255) ** 2 }, out, y0, y1);
  return { counts, status, out, confidence: out.cost, poor };
}
