/**
 * Valid but unusual photos that `lamella map` must handle: 16-bit PNG and TIFF, an alpha channel
 * (transparent pixels are not film), EXIF orientation (a JPEG stored sideways maps in its upright
 * orientation, as EXIF 2.3 tag 0x0112 Orientation = 6 means "rotate 90° clockwise to display";
 * JEITA CP-3451), and a 1×1 image. ROUND TRIPS THROUGH OUR OWN FORWARD MODEL on an INVENTED
 * soap-film field, written by sharp and mapped from the file.
 */
import { mkdirSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, describe, expect, it } from 'vitest';
import { mapPhotoFile, writeMapOutputs } from '../src/map/mapPhoto.js';
import { mapReportInput } from '../src/map/mapReportInput.js';
import { renderMapReport } from '../src/report/index.js';
import { type MapOptions, PixelStatus } from '../src/map/types.js';
import { resolveStack } from '../src/optics/index.js';
import { sampleField, scoreMap, shoot, writePhoto, type Shot } from './map-scenes.js';

const dir = mkdtempSync(join(tmpdir(), 'lamella-map-inputs-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const W = 120;
const H = 90;
// Invented: thin at the top, thick at the bottom, and thicker to the right, so that any rotation
// or mirror of the photo would show.
const truth = sampleField(W, H, (x, y) => 140 + 850 * (y / H) + 120 * (x / W) + 15 * Math.sin(x / 6));
const shot: Shot = { stack: 'soap-film', exposure: 6.5, whiteBalance: [1.03, 1, 0.97], flare: 0.01, noise: 0.003, seed: 6 };
const options: MapOptions = { stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000 };

describe('lamella map on unusual valid photos', () => {
  it.each(['png', 'tiff'] as const)('16-bit %s is read at 16 bits and mapped', async (format) => {
    const path = join(dir, `deep.${format === 'png' ? 'png' : 'tif'}`);
    await writePhoto(path, shoot(truth, W, H, { ...shot, bitDepth: 16 }), W, H, format);
    expect((await sharp(path).metadata()).depth).toBe('ushort');
    const result = await mapPhotoFile(path, options);
    const score = scoreMap(truth, result);
    expect(score.coverage).toBeGreaterThan(0.9);
    expect(score.medianAbsNm).toBeLessThan(2);
    expect(score.gross).toBeLessThan(0.005);
  });

  it('an alpha channel: transparent pixels are excluded and do not disturb the map', async () => {
    const rgb = shoot(truth, W, H, shot) as Uint8Array;
    const rgba = Buffer.alloc(W * H * 4);
    const transparent = (x: number, y: number): boolean => x >= 80 && y < 40;
    for (let i = 0; i < W * H; i++) {
      const x = i % W;
      const y = Math.floor(i / W);
      // Under the transparent block the colour is garbage (saturated magenta).
      rgba[i * 4] = transparent(x, y) ? 255 : rgb[i * 3];
      rgba[i * 4 + 1] = transparent(x, y) ? 0 : rgb[i * 3 + 1];
      rgba[i * 4 + 2] = transparent(x, y) ? 255 : rgb[i * 3 + 2];
      rgba[i * 4 + 3] = transparent(x, y) ? 0 : 255;
    }
    const path = join(dir, 'alpha.png');
    await sharp(rgba, { raw: { width: W, height: H, channels: 4 } }).png().toFile(path);
    const result = await mapPhotoFile(path, options);
    let excluded = 0;
    let wrong = 0;
    for (let i = 0; i < W * H; i++) {
      const isTransparent = transparent(i % W, Math.floor(i / W));
      if (isTransparent) excluded++;
      if (isTransparent !== (result.status[i] === PixelStatus.excluded)) wrong++;
    }
    expect(wrong).toBe(0);
    const opaque = scoreMap(truth, result, (i) => !transparent(i % W, Math.floor(i / W)));
    expect(opaque.coverage).toBeGreaterThan(0.9);
    expect(opaque.medianAbsNm).toBeLessThan(2);
    // Coverage in the statistics is over the film (opaque) pixels only.
    const ok = result.status.filter((s) => s === PixelStatus.ok).length;
    expect(result.stats.coverage).toBeCloseTo(ok / (W * H - excluded), 12);
  });

  it('EXIF orientation 6: a JPEG stored sideways is mapped upright', async () => {
    const upright = shoot(truth, W, H, shot) as Uint8Array;
    const path = join(dir, 'sideways.jpg');
    // Store the pixels turned 90° anticlockwise (H wide, W high) and tag them "rotate 90° clockwise".
    await sharp(Buffer.from(upright), { raw: { width: W, height: H, channels: 3 } })
      .rotate(270)
      .jpeg({ quality: 92, chromaSubsampling: '4:4:4' })
      .withMetadata({ orientation: 6 })
      .toFile(path);
    const meta = await sharp(path).metadata();
    expect([meta.width, meta.height, meta.orientation]).toEqual([H, W, 6]);
    const result = await mapPhotoFile(path, options);
    expect([result.width, result.height]).toEqual([W, H]);
    const score = scoreMap(truth, result);
    expect(score.coverage).toBeGreaterThan(0.85);
    expect(score.medianAbsNm).toBeLessThan(3);
    expect(score.gross).toBeLessThan(0.01);
  });

  it('a 1×1 photo is mapped with a stated assumption instead of failing', async () => {
    const path = join(dir, 'dot.png');
    await writePhoto(path, shoot(Float32Array.of(400), 1, 1, shot), 1, 1, 'png');
    const result = await mapPhotoFile(path, options);
    expect([result.width, result.height]).toEqual([1, 1]);
    expect(result.thicknessNm).toHaveLength(1);
    expect(result.warnings.join(' ')).toMatch(/too few to fit exposure/);
    expect(result.stats.coverage).toBeGreaterThanOrEqual(0);
    expect(result.stats.coverage).toBeLessThanOrEqual(1);
    // Every output, the report included, is written for it.
    const out = join(dir, 'dot-out');
    mkdirSync(out);
    const written = await writeMapOutputs(result, path, out, 'dot', { images: true, json: true, npy: true, tiff: true }, options);
    expect(written).toHaveLength(7); // thickness (npy, tif), confidence, status, map, flags, JSON
    for (const file of written) expect(statSync(file).size).toBeGreaterThan(0);
    const html = renderMapReport(await mapReportInput(result, options, path));
    expect(html).toContain('dot.png');
  });
});
