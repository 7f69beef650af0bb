// The library's one-call jobs (src/api): mapPhoto takes a path, the bytes of a photo file or a
// decoded photo and gives the same map for each; calibrate likewise; the package root is the only
// way in (package.json "exports"; Node's package self-reference). The photo is the demo's invented
// frame (a round trip through our own forward model); the calibration scene is our own step wafer.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { calibrate, chart, mapPhoto, render, spectrum } from '../src/api/index.js';
import { resolveStack } from '../src/optics/resolveStack.js';
import { writeNpy } from '../src/io/encodeNpy.js';
import sharp from 'sharp';
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

  it('the root exports the jobs and building blocks, not the helpers behind them', () => {
    const script = [
      "const root = await import('lamella');",
      "const jobs = ['mapPhoto', 'mapPhotos', 'writeMapOutputs', 'calibrate', 'runSeries', 'chart', 'spectrum', 'render', 'resolveStack', 'resolveLight', 'buildCamera', 'readPhoto', 'readNpy', 'deltaE2000'];",
      "const internals = ['atomicWriteFile', 'assertNoInputOverwritten', 'ensureOutputDir', 'seriesJobOptions', 'multiplyMatrix3', 'createNormal', 'encodedCodeTable', 'filmWeightedTable', 'rasteriseSvg', 'oneLine', 'exitCodeFor', 'mapPhotoFile'];",
      'console.log(JSON.stringify({ missing: jobs.filter((n) => typeof root[n] !== "function"), leaked: internals.filter((n) => n in root) }));',
    ].join('\n');
    const r = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', cwd: root });
    expect(r.status, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout)).toEqual({ missing: [], leaked: [] });
  });
});

// The library's chart, spectrum and render give what the commands write (the commands only parse,
// call them and write): a consistency check between the two ways in. The spectrum is also checked
// against the quarter-wave film: n = 1.4 in air, n·d = λ/4, reflects 4r²/(1 + r²)² with
// r = (n − 1)/(n + 1) (Born & Wolf, Principles of Optics, 7th ed. 1999, §7.6.1; from memory).
describe('chart, spectrum and render', () => {
  const cli = (args: string[]): { status: number | null; stdout: Buffer; stderr: string } => {
    const r = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { cwd: root });
    return { status: r.status, stdout: r.stdout, stderr: r.stderr.toString('utf8') };
  };

  it('chart: the CSV and JSON bytes are the command\'s output; a bad range is a RangeError', async () => {
    for (const format of ['csv', 'json'] as const) {
      const fromLibrary = await chart({ stack: 'oxide-on-silicon', light: 'F11', toNm: 300, stepNm: 10, format });
      const fromCli = cli(['chart', '--stack', 'oxide-on-silicon', '--light', 'F11', '--to', '300', '--step', '10', '--format', format]);
      expect(fromCli.status, fromCli.stderr).toBe(0);
      expect(Buffer.from(fromLibrary.bytes).equals(fromCli.stdout)).toBe(true);
      expect(fromLibrary.table.thicknessesNm).toHaveLength(31);
    }
    await expect(chart({ stack: 'oxide-on-silicon', light: 'F11', fromNm: 300, toNm: 100 })).rejects.toThrow(RangeError);
  }, 60_000);

  it('spectrum: the quarter-wave film\'s reflectance, and the command\'s CSV text', () => {
    const n = 1.4;
    const thicknessNm = 550 / (4 * n);
    const result = spectrum({ stack: resolveStack('soap-film', { filmMaterial: n }), thicknessNm, fromNm: 550, toNm: 550, stepNm: 1 });
    const r = (n - 1) / (n + 1);
    // Air in the preset is dispersive (n ≈ 1.0003): agreement to 1e-3.
    expect(result.reflectance[0]).toBeCloseTo((4 * r * r) / (1 + r * r) ** 2, 3);
    const fromCli = cli(['spectrum', '--stack', 'soap-film', '--film-index', '1.4', '--thickness', String(thicknessNm), '--from', '540', '--to', '560', '--step', '5']);
    expect(fromCli.status, fromCli.stderr).toBe(0);
    const text = spectrum({ stack: resolveStack('soap-film', { filmMaterial: n }), thicknessNm, fromNm: 540, toNm: 560, stepNm: 5 }).text;
    expect(text).toBe(fromCli.stdout.toString('utf8'));
  });

  it('render: a thickness map in memory gives the pixels the command writes into a PNG', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'lamella-api-render-'));
    const width = 16;
    const height = 6;
    const thicknessNm = new Float32Array(width * height).map((_, i) => 50 + 20 * (i % width) + 5 * Math.floor(i / width));
    await writeNpy(join(dir, 'wedge.npy'), thicknessNm, [height, width]);
    const fromCli = cli(['render', join(dir, 'wedge.npy'), '--stack', 'oxide-on-silicon', '--light', 'D65', '--exposure', '0.9', '--noise', '0.01', '--seed', '7', '--out', join(dir, 'wedge.png')]);
    expect(fromCli.status, fromCli.stderr).toBe(0);
    const written = await sharp(join(dir, 'wedge.png')).raw().toBuffer();
    const fromLibrary = await render({ thicknessNm, width, height }, { stack: 'oxide-on-silicon', light: 'D65', exposure: 0.9, noiseSigma: 0.01, seed: 7 });
    expect(Buffer.from(fromLibrary.data.buffer, fromLibrary.data.byteOffset, fromLibrary.data.byteLength).equals(written)).toBe(true);
    const fromFile = await render(join(dir, 'wedge.npy'), { stack: 'oxide-on-silicon', light: 'D65', exposure: 0.9, noiseSigma: 0.01, seed: 7 });
    expect(Buffer.from(fromFile.data.buffer).equals(Buffer.from(fromLibrary.data.buffer))).toBe(true);
  }, 60_000);
});
