// The library's one-call jobs (src/api): mapPhoto takes a path, the bytes of a photo file or a
// decoded photo and gives the same map for each; calibrate likewise; the package root is the only
// way in (package.json "exports"; Node's package self-reference). The photo is the demo's invented
// frame (a round trip through our own forward model); the calibration scene is our own step wafer.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { calibrate, mapPhoto } from '../src/api/index.js';
import { readPhoto } from '../src/io/readPhoto.js';
import { InputError } from '../src/errors.js';
import { asCameraJpeg, stepKnown, stepWaferNm, takePhoto } from './response-scenes.js';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';

const root = new URL('..', import.meta.url).pathname;
const frame = join(root, 'fixtures', 'demo', 'film_008.jpg');
const options = { stack: 'soap-film', light: 'D65', thinBelowNm: 100 } as const;

describe('mapPhoto', () => {
  it('a path, the file\'s bytes and the decoded photo give byte-identical maps', async () => {
    const fromPath = await mapPhoto(frame, options);
    const fromBytes = await mapPhoto(readFileSync(frame), { ...options, name: 'film_008.jpg' });
    const fromPhoto = await mapPhoto(await readPhoto(frame), options);
    for (const other of [fromBytes, fromPhoto]) {
      expect(Buffer.from(other.thicknessNm.buffer).equals(Buffer.from(fromPath.thicknessNm.buffer))).toBe(true);
      expect(other.stats).toEqual(fromPath.stats);
    }
    expect(fromPath.stats.coverage).toBeGreaterThan(0.8);
  }, 120_000);

  it('a mask in memory keeps the map to it; a mask of the wrong size is an InputError naming the photo', async () => {
    const photo = await readPhoto(frame);
    const mask = new Uint8Array(photo.width * photo.height);
    for (let y = 0; y < photo.height / 2; y++) mask.fill(1, y * photo.width, (y + 1) * photo.width);
    const half = await mapPhoto(photo, { ...options, mask, filmArea: 'whole' });
    const last = half.thicknessNm.subarray((photo.height - 1) * photo.width);
    expect(last.every((v) => Number.isNaN(v))).toBe(true);
    await expect(mapPhoto(photo, { ...options, mask: new Uint8Array(5), name: 'frame 8' })).rejects.toThrow(InputError);
    await expect(mapPhoto(photo, { ...options, mask: new Uint8Array(5), name: 'frame 8' })).rejects.toThrow(/frame 8/);
  }, 120_000);

  it('anything else is a TypeError saying what a photo may be', async () => {
    await expect(mapPhoto({ width: 2 } as never, options)).rejects.toThrow(/file path, the bytes of a photo file/);
  });
});

describe('calibrate', () => {
  it('from the bytes of a step wafer photo: exposure found, every known region explained (ΔE2000 < 1, a just-noticeable difference; common practice)', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'lamella-api-'));
    const samples = takePhoto(stepWaferNm(), { stack: 'oxide-on-silicon', light: 'F11', exposure: 1.3, flare: 0.01, noise: 0.002, seed: 3, style: null });
    await asCameraJpeg(join(dir, 'steps.jpg'), samples);
    const record = await calibrate(readFileSync(join(dir, 'steps.jpg')), { stack: 'oxide-on-silicon', light: 'F11', angleRad: 0, known: stepKnown(), name: 'steps.jpg' });
    expect(record.photo).toBe('steps.jpg');
    for (const k of record.known_regions as Array<{ residual_delta_e2000: number }>) expect(k.residual_delta_e2000).toBeLessThan(1);
  }, 120_000);
});

describe('the package root is the only way in', () => {
  it('lamella resolves to the root; a deep path into dist is not exported', () => {
    const script = [
      "const root = await import('lamella');",
      "let deep = 'reachable';",
      "try { await import('lamella/dist/map/mapPhoto.js'); } catch (e) { deep = e.code; }",
      'console.log(JSON.stringify({ mapPhoto: typeof root.mapPhoto, runSeries: typeof root.runSeries, calibrate: typeof root.calibrate, internal: typeof root.removeTempFilesOnSignals, deep }));',
    ].join('\n');
    const r = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', cwd: root });
    expect(r.status, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual({ mapPhoto: 'function', runSeries: 'function', calibrate: 'function', internal: 'undefined', deep: 'ERR_PACKAGE_PATH_NOT_EXPORTED' });
  });
});
