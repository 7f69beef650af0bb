/**
 * The threaded pixel pass (src/map/pixelThreads.ts), run from the compiled `dist/` (helper
 * threads load JavaScript; `npm test` builds first). Splitting the rows between threads must not
 * change a single value: every pixel is computed as on one thread, so the maps are compared byte
 * for byte (an identity of the design, not physics). The photo is an invented draining film
 * rendered by our forward model (tests/map-scenes.ts) and written as a 4:2:0 JPEG.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type * as MapPhotoModule from '../src/map/mapPhoto.js';
import type * as ReadPhotoModule from '../src/io/readPhoto.js';
import type * as OpticsModule from '../src/optics/index.js';
import type * as PixelThreadsModule from '../src/map/pixelThreads.js';
import type * as EvenOutLightModule from '../src/map/evenOutLight.js';
import { mapDecodedPhoto as mapFromSources } from '../src/map/mapPhoto.js';
import { readPhoto as readFromSources } from '../src/io/readPhoto.js';
import { resolveStack } from '../src/optics/index.js';
import { sampleField, shoot, writePhoto } from './map-scenes.js';
import { pixelsOfPhoto } from '../src/map/photoPixels.js';

const dist = (path: string) => new URL(`../dist/${path}`, import.meta.url).href;
const bin = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'lamella-threads-'));
const photo = join(dir, 'film.jpg');
// 1,280 × 900 = 1.15 MP, above the 1-MP threshold for threads.
const W = 1280;
const H = 900;

beforeAll(async () => {
  const truth = sampleField(W, H, (x, y) => 40 + 900 * (y / H) + 60 * Math.sin(x / 70) * Math.exp(-y / 400));
  await writePhoto(photo, shoot(truth, W, H, { stack: 'soap-film', exposure: 7, flare: 0.01, noise: 0.003, seed: 4 }), W, H, 'jpeg', 90, '4:2:0');
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function bytes(values: Float32Array | Uint8Array | Uint16Array): Buffer {
  return Buffer.from(values.buffer, values.byteOffset, values.byteLength);
}

describe('threaded pixel pass', () => {
  it('1, 2 and 3 threads give byte-identical thickness, confidence and status maps (compiled code, real helper threads)', async () => {
    const { mapDecodedPhoto } = (await import(dist('map/mapPhoto.js'))) as typeof MapPhotoModule;
    const { readPhoto } = (await import(dist('io/readPhoto.js'))) as typeof ReadPhotoModule;
    const { resolveStack: resolveCompiled } = (await import(dist('optics/index.js'))) as typeof OpticsModule;
    const decoded = await readPhoto(photo);
    expect(decoded.rgb.buffer).toBeInstanceOf(SharedArrayBuffer);
    const options = { stack: resolveCompiled('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000 };
    const one = mapDecodedPhoto(decoded, { ...options, threads: 1 }, null, photo);
    expect(one.stats.coverage).toBeGreaterThan(0.9);
    for (const threads of [2, 3]) {
      const many = mapDecodedPhoto(decoded, { ...options, threads }, null, photo);
      expect(bytes(many.thicknessNm).equals(bytes(one.thicknessNm)), `thickness, ${threads} threads`).toBe(true);
      expect(bytes(many.confidence).equals(bytes(one.confidence)), `confidence, ${threads} threads`).toBe(true);
      expect(bytes(many.status).equals(bytes(one.status)), `status, ${threads} threads`).toBe(true);
      expect(many.stats).toEqual(one.stats);
      expect(many.ambiguousReasons).toEqual(one.ambiguousReasons);
    }
    // The helpers really ran (the compiled worker file was found and started).
    const { helperThreadCount } = (await import(dist('map/pixelThreads.js'))) as typeof PixelThreadsModule;
    expect(helperThreadCount()).toBe(2);
  });

  it('evening a large photo by a light field: 1, 2 and 3 threads give byte-identical photos, with and without a picture style', async () => {
    const { evenOutLight } = (await import(dist('map/evenOutLight.js'))) as typeof EvenOutLightModule;
    const { readPhoto } = (await import(dist('io/readPhoto.js'))) as typeof ReadPhotoModule;
    const decoded = await readPhoto(photo);
    // A 35 % fall-off with vignetting (log-gain coefficients of our own choosing).
    const field = [0.05, -0.3, 0.08, -0.05, 0.03, -0.04, -0.15];
    for (const response of [null, { contrast: 0.3, gamma: 0.95, saturation: 1.2 }]) {
      // The 8-bit JPEG is read as its codes, and evened back onto codes.
      const pixels = pixelsOfPhoto(decoded);
      expect(pixels.codes).not.toBeNull();
      const one = evenOutLight(pixels, W, H, field, [0.01, 0.01, 0.01], [-0.4, 0.4], response, true, 1);
      let moved = 0;
      for (let i = 0; i < one.length; i++) if (one.codes![i] !== pixels.codes![i]) moved++;
      expect(moved).toBeGreaterThan(0.5 * one.length);
      for (const threads of [2, 3]) {
        const many = evenOutLight(pixels, W, H, field, [0.01, 0.01, 0.01], [-0.4, 0.4], response, true, threads);
        expect(bytes(many.codes!).equals(bytes(one.codes!)), `${threads} threads, ${response ? 'styled' : 'plain'}`).toBe(true);
      }
    }
  });

  it('from the TypeScript sources (no compiled helper file) threads fall back to one, with the same map', async () => {
    const decoded = await readFromSources(photo);
    const options = { stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000 };
    const one = mapFromSources(decoded, { ...options, threads: 1 }, null, photo);
    const two = mapFromSources(decoded, { ...options, threads: 2 }, null, photo);
    expect(bytes(two.thicknessNm).equals(bytes(one.thicknessNm))).toBe(true);
  });

  it('lamella map --threads takes a whole number from 1 to 64 (exit 2 otherwise, one line)', () => {
    for (const bad of ['0', '1.5', 'many', '65']) {
      const run = spawnSync(process.execPath, [bin, 'map', photo, '--stack', 'soap-film', '--out', join(dir, 'bad'), '--threads', bad], { encoding: 'utf8' });
      expect(run.status).toBe(2);
      expect(run.stderr.trim()).toBe(`lamella: --threads must be a whole number from 1 to 64, received ${bad}`);
    }
  });
});
