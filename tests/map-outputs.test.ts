/**
 * Every file `lamella map` writes, read back independently of the code that wrote it:
 * - `.npy` by a minimal parser written here from the NumPy format description ("A simple file
 *   format for NumPy arrays", NEP 1 / numpy.lib.format: magic \x93NUMPY, version, little-endian
 *   header length, a Python dict literal with descr, fortran_order and shape, then the data);
 * - the float TIFF by sharp (libvips), a general-purpose reader;
 * - the PNG previews by sharp;
 * - the JSON record, whose statistics are recomputed from the .npy (type-7 percentiles, Hyndman &
 *   Fan 1996, as in map-statistics.test.ts) and whose pixel counts must agree with it.
 * The photo is an invented soap-film wedge rendered by our own forward model (round trip); the map
 * from the CLI (spawned, bin/lamella.js on dist/) is compared with the same map made in-process.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mapResultJson } from '../src/map/mapResultJson.js';
import { mapPhotoFile, type MappedPhoto } from '../src/map/mapPhoto.js';
import { resolveStack } from '../src/optics/index.js';
import { sampleField, shoot, writePhoto } from './map-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-map-out-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const W = 150;
const H = 100;
const photo = join(dir, 'wedge.jpg');
const out = join(dir, 'out');

/** Minimal .npy reader: format 1.0/2.0/3.0, '<f4', C order. Independent of src/io. */
function readNpyFloat32(bytes: Buffer): { shape: number[]; data: Float32Array } {
  const magic = Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]); // \x93NUMPY
  if (!bytes.subarray(0, 6).equals(magic)) throw new Error('not an .npy file (bad magic)');
  const major = bytes[6];
  const headerLength = major === 1 ? bytes.readUInt16LE(8) : bytes.readUInt32LE(8);
  const start = major === 1 ? 10 : 12;
  const header = bytes.subarray(start, start + headerLength).toString('latin1');
  const descr = /'descr':\s*'([^']+)'/.exec(header)?.[1];
  const fortran = /'fortran_order':\s*(True|False)/.exec(header)?.[1];
  const shapeText = /'shape':\s*\(([^)]*)\)/.exec(header)?.[1];
  if (descr !== '<f4' || fortran !== 'False' || shapeText === undefined) throw new Error(`unexpected header ${header}`);
  const shape = shapeText.split(',').map((s) => s.trim()).filter((s) => s !== '').map(Number);
  const offset = start + headerLength;
  const count = shape.reduce((a, b) => a * b, 1);
  if (bytes.length - offset !== count * 4) throw new Error(`data holds ${bytes.length - offset} bytes, expected ${count * 4}`);
  const data = new Float32Array(count);
  for (let i = 0; i < count; i++) data[i] = bytes.readFloatLE(offset + i * 4);
  return { shape, data };
}

function type7(sorted: readonly number[], p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  return sorted[lo] + (h - lo) * (sorted[Math.min(sorted.length - 1, lo + 1)] - sorted[lo]);
}

let cli: { status: number | null; stdout: string; stderr: string };
let inProcess: MappedPhoto;

beforeAll(async () => {
  // Invented: a wedge 120 → 1,000 nm down the frame with a ripple across, and a 4 nm black-film
  // cap in the top rows, so that there are estimates, too-dark pixels and a thin region.
  const truth = sampleField(W, H, (x, y) => (y < 8 ? 4 : 120 + 880 * (y / H) * (1 + 0.05 * Math.sin(x / 9))));
  await writePhoto(photo, shoot(truth, W, H, { stack: 'soap-film', exposure: 6.5, flare: 0.01, noise: 0.003, seed: 9 }), W, H, 'jpeg', 90);
  const result = spawnSync(
    process.execPath,
    [join(root, 'bin', 'lamella.js'), 'map', photo, '--stack', 'soap-film', '--out', out, '--pixel-size', '4', '--json'],
    { encoding: 'utf8', cwd: root },
  );
  cli = { status: result.status, stdout: result.stdout, stderr: result.stderr };
  inProcess = await mapPhotoFile(photo, { stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000, pixelSizeUm: 4 });
});

describe('lamella map outputs, read back', () => {
  it('runs and writes every output', () => {
    expect(cli.stderr).toBe('');
    expect(cli.status).toBe(0);
    for (const suffix of ['.thickness.npy', '.confidence.npy', '.status.npy', '.thickness.tif', '.map.png', '.flags.png', '.json', '.report.html']) {
      expect(existsSync(join(out, `wedge${suffix}`)), suffix).toBe(true);
    }
    expect(existsSync(join(out, 'report.html'))).toBe(true);
  });

  it('.thickness.npy: float32 [height, width], identical to the in-process map (NaN where no estimate)', () => {
    const { shape, data } = readNpyFloat32(readFileSync(join(out, 'wedge.thickness.npy')));
    expect(shape).toEqual([H, W]);
    let estimates = 0;
    let mismatches = 0;
    for (let i = 0; i < data.length; i++) {
      const a = data[i];
      const b = inProcess.thicknessNm[i];
      if (Number.isNaN(b) ? !Number.isNaN(a) : a !== b) mismatches++;
      if (!Number.isNaN(b)) estimates++;
    }
    expect(mismatches).toBe(0);
    expect(estimates).toBeGreaterThan(0.8 * W * H);
  });

  it('.confidence.npy: 0..1, zero exactly where the thickness is NaN', () => {
    const thickness = readNpyFloat32(readFileSync(join(out, 'wedge.thickness.npy'))).data;
    const { shape, data } = readNpyFloat32(readFileSync(join(out, 'wedge.confidence.npy')));
    expect(shape).toEqual([H, W]);
    let bad = 0;
    for (let i = 0; i < data.length; i++) {
      if (!(data[i] >= 0 && data[i] <= 1) || (Number.isNaN(thickness[i]) && data[i] !== 0)) bad++;
      if (data[i] !== inProcess.confidence[i]) bad++;
    }
    expect(bad).toBe(0);
  });

  it('.thickness.tif: a one-band 32-bit float image that sharp reads to the same values', async () => {
    const meta = await sharp(join(out, 'wedge.thickness.tif')).metadata();
    expect([meta.format, meta.width, meta.height, meta.channels, meta.depth]).toEqual(['tiff', W, H, 1, 'float']);
    const data = await sharp(join(out, 'wedge.thickness.tif')).extractChannel(0).raw({ depth: 'float' }).toBuffer();
    expect(data.length).toBe(W * H * 4);
    const values = new Float32Array(data.buffer, data.byteOffset, W * H);
    const npy = readNpyFloat32(readFileSync(join(out, 'wedge.thickness.npy'))).data;
    let mismatches = 0;
    for (let i = 0; i < values.length; i++) if (Number.isNaN(npy[i]) ? !Number.isNaN(values[i]) : values[i] !== npy[i]) mismatches++;
    expect(mismatches).toBe(0);
  });

  it('.map.png and .flags.png decode as RGB images at least the size of the photo', async () => {
    for (const name of ['wedge.map.png', 'wedge.flags.png']) {
      const meta = await sharp(join(out, name)).metadata();
      expect(meta.format).toBe('png');
      expect(meta.width).toBeGreaterThanOrEqual(W);
      expect(meta.height).toBeGreaterThanOrEqual(H);
      expect(meta.channels).toBeGreaterThanOrEqual(3);
      const stats = await sharp(join(out, name)).stats();
      // Not a blank image: the channels vary.
      expect(stats.channels.slice(0, 3).some((c) => c.stdev > 5)).toBe(true);
    }
  });

  it('JSON (file and --json stdout): fields present, statistics recomputed from the .npy agree', () => {
    const record = JSON.parse(readFileSync(join(out, 'wedge.json'), 'utf8'));
    // --json prints an array of records, one per photo, also for one photo.
    expect(JSON.parse(cli.stdout)).toEqual([record]);
    expect(record.width_px).toBe(W);
    expect(record.height_px).toBe(H);
    expect(record.photo).toBe('wedge.jpg');
    expect(record.settings.stack).toBe('soap-film');
    expect(record.settings.pixel_size_um).toBe(4);
    expect(record.settings.thin_below_nm).toBe(50);
    for (const key of ['exposure', 'white_balance', 'flare', 'source']) expect(record.fitted).toHaveProperty(key);
    expect(typeof record.limits.dark_limit_nm).toBe('number');
    // A free film looks black when very thin, so it has a dark limit (common practice: black film).
    expect(record.limits.dark_limit_nm).toBeGreaterThan(0);
    expect(record.limits.dark_meaning).toBe(`pixels marked too dark are "thinner than ${record.limits.dark_limit_nm} nm or no film"`);
    expect(typeof record.caution).toBe('string');

    const npy = readNpyFloat32(readFileSync(join(out, 'wedge.thickness.npy'))).data;
    const values = [...npy].filter((v) => !Number.isNaN(v)).sort((a, b) => a - b);
    const counts = record.pixel_counts;
    expect(counts.ok + counts.too_dark + counts.too_thick + counts.ambiguous + counts.excluded + counts.saturated + counts.not_film + counts.undecided).toBe(W * H);
    expect(counts.ok).toBe(values.length);
    expect(counts.too_dark).toBeGreaterThan(0);
    const s = record.statistics;
    const mean = values.reduce((a, b) => a + b, 0) / values.length;
    const std = Math.sqrt(values.reduce((a, v) => a + (v - mean) ** 2, 0) / (values.length - 1));
    expect(s.mean_nm).toBeCloseTo(mean, 6);
    expect(s.std_nm).toBeCloseTo(std, 6);
    expect(s.median_nm).toBeCloseTo(type7(values, 0.5), 6);
    expect(s.p05_nm).toBeCloseTo(type7(values, 0.05), 6);
    expect(s.p95_nm).toBeCloseTo(type7(values, 0.95), 6);
    expect(s.min_nm).toBe(values[0]);
    expect(s.max_nm).toBe(values[values.length - 1]);
    // Coverage is over the film area: every pixel but those outside region/mask, not film or undecided.
    expect(s.coverage).toBeCloseTo(values.length / (W * H - counts.excluded - counts.not_film - counts.undecided), 12);
    const thin = values.filter((v) => v < 50).length;
    expect(s.thin_fraction).toBeCloseTo((thin + counts.too_dark) / (values.length + counts.too_dark), 12);
    expect(record.histogram.counts.reduce((a: number, b: number) => a + b, 0)).toBe(values.length);
    expect(s.thin_regions).toBe(record.thin_regions.length);
    expect(record.thin_regions.length).toBeGreaterThan(0);
    for (const region of record.thin_regions) {
      expect(region.area_um2).toBeCloseTo(region.area_px * 16, 9);
      expect(region.area_mm2).toBeCloseTo(region.area_px * 16e-6, 15);
    }
  });

  it('the HTML report is a complete page naming the photo', () => {
    const html = readFileSync(join(out, 'wedge.report.html'), 'utf8');
    expect(html.trimStart().toLowerCase().startsWith('<!doctype html')).toBe(true);
    expect(html).toContain('wedge.jpg');
    expect(html.trimEnd().toLowerCase().endsWith('</html>')).toBe(true);
  });
});

describe('the dark limit of a film that never looks dark (oxide on silicon)', () => {
  it('is 0 nm, and the JSON says what a too-dark pixel then means', () => {
    const result = { ...inProcess, darkLimitNm: 0 };
    const record = mapResultJson(result, { stack: resolveStack('oxide-on-silicon'), angleRad: 0, light: 'D65', thinBelowNm: null, maxThicknessNm: 2000 }, 'wafer.jpg') as {
      limits: { dark_limit_nm: number; dark_meaning: string };
    };
    expect(record.limits.dark_limit_nm).toBe(0);
    expect(record.limits.dark_meaning).toBe('pixels marked too dark are darker than any thickness of this film can look (a shadow, dirt, or no film); they get no thickness');
  });
});
