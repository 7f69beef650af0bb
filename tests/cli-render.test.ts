/**
 * `lamella render` end to end (spawns bin/lamella.js; the test script builds dist/ first).
 * Round trip within our own forward model: a thickness ramp rendered to PNG must show the chart
 * colours of the same thicknesses: 8-bit codes within 1 (table rounding) and max ΔE2000 < 1 (one
 * code step in a dark colour is up to about 0.5–1 ΔE2000; 1 is about a just-noticeable difference).
 * The chart itself is checked against outside references in cli-chart and colour-* tests.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { convertLinearSrgbToXyz, convertXyzToLab, deltaE2000, resolveLight, SRGB_WHITE_XYZ, srgb8ToLinear } from '../src/colour/index.js';
import { encodeNpy } from '../src/io/encodeNpy.js';
import { encodeFloatTiff } from '../src/io/encodeFloatTiff.js';
import { resolveStack } from '../src/optics/index.js';
import { chartTable } from '../src/render/chartTable.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-render-'));
const width = 201;
const height = 3;
const rampPath = join(dir, 'ramp.npy');

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: root });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

function labOf8(r: number, g: number, b: number): [number, number, number] {
  const xyz = convertLinearSrgbToXyz([srgb8ToLinear(r), srgb8ToLinear(g), srgb8ToLinear(b)]).map((v) => v * 100);
  return convertXyzToLab(xyz, SRGB_WHITE_XYZ.map((v) => v * 100));
}

beforeAll(() => {
  // Ramp 0–1000 nm in 5 nm steps along x; the middle row has one NaN pixel.
  const data = new Float32Array(width * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) data[y * width + x] = x * 5;
  data[width + 7] = Number.NaN;
  writeFileSync(rampPath, encodeNpy(data, [height, width]));
});

describe('lamella render', () => {
  it('renders a ramp whose pixels carry the chart colours (codes within 1, max ΔE2000 < 1) and warns about the NaN pixel', async () => {
    const out = join(dir, 'ramp.png');
    const result = lamella('render', rampPath, '--stack', 'oxide-on-silicon', '--light', 'F7', '--out', out);
    expect(result.status).toBe(0);
    expect(result.stderr).toContain('1 pixel with no thickness (NaN) rendered black');
    const { data, info } = await sharp(out).raw().toBuffer({ resolveWithObject: true });
    expect([info.width, info.height, info.channels]).toEqual([width, height, 3]);
    const chart = chartTable({ stack: resolveStack('oxide-on-silicon'), light: resolveLight('F7'), angleRad: 0, fromNm: 0, toNm: 1000, stepNm: 5 });
    let worst = 0;
    for (let x = 0; x < width; x++) {
      const p = x * 3;
      const rendered = labOf8(data[p], data[p + 1], data[p + 2]);
      const expected = labOf8(chart.srgb8[p], chart.srgb8[p + 1], chart.srgb8[p + 2]);
      worst = Math.max(worst, deltaE2000(expected, rendered));
      for (let c = 0; c < 3; c++) expect(Math.abs(data[p + c] - chart.srgb8[p + c])).toBeLessThanOrEqual(1);
    }
    expect(worst).toBeLessThan(1);
    const nan = (width + 7) * 3;
    expect([data[nan], data[nan + 1], data[nan + 2]]).toEqual([0, 0, 0]);
  });
  it('writes 16-bit TIFF from a float TIFF map, and JPEG at a given quality', async () => {
    const grid = new Float32Array(64 * 16).map((_, i) => (i % 64) * 10);
    const tiffIn = join(dir, 'map.tif');
    writeFileSync(tiffIn, encodeFloatTiff(grid, 64, 16));
    const tiffOut = join(dir, 'photo.tiff');
    expect(lamella('render', tiffIn, '--stack', 'nitride-on-silicon', '--light', 'LED-B3', '--out', tiffOut).status).toBe(0);
    expect((await sharp(tiffOut).metadata()).depth).toBe('ushort');
    const jpegOut = join(dir, 'photo.jpg');
    expect(lamella('render', tiffIn, '--stack', 'nitride-on-silicon', '--light', 'LED-B3', '--quality', '80', '--out', jpegOut).status).toBe(0);
    expect((await sharp(jpegOut).metadata()).format).toBe('jpeg');
  });
  it('the same seed gives the same noisy image', () => {
    const a = join(dir, 'a.png');
    const b = join(dir, 'b.png');
    lamella('render', rampPath, '--stack', 'soap-film', '--light', 'D65', '--exposure', '8', '--noise', '0.02', '--seed', '3', '--out', a);
    lamella('render', rampPath, '--stack', 'soap-film', '--light', 'D65', '--exposure', '8', '--noise', '0.02', '--seed', '3', '--out', b);
    expect(readFileSync(a).equals(readFileSync(b))).toBe(true);
  });
  it('refuses to overwrite its input (usage error, exit 2) and leaves it unchanged', () => {
    const tiffIn = join(dir, 'keep.tif');
    writeFileSync(tiffIn, encodeFloatTiff(new Float32Array(4).fill(100), 2, 2));
    const before = readFileSync(tiffIn);
    const result = lamella('render', tiffIn, '--stack', 'soap-film', '--light', 'D65', '--out', tiffIn);
    expect(result.status).toBe(2);
    expect(result.stderr).toContain('output would overwrite an input file');
    expect(readFileSync(tiffIn).equals(before)).toBe(true);
  });
  it('a 16-bit PNG map needs --png-scale (exit 3 naming the file)', async () => {
    const png = join(dir, 'map16.png');
    await sharp(Buffer.from(new Uint16Array(16).fill(1000).buffer), { raw: { width: 4, height: 4, channels: 1, premultiplied: false } })
      .toColourspace('grey16')
      .png()
      .toFile(png);
    const without = lamella('render', png, '--stack', 'soap-film', '--light', 'D65', '--out', join(dir, 'p.png'));
    expect(without.status).toBe(3);
    expect(without.stderr).toContain(png);
    const withScale = lamella('render', png, '--stack', 'soap-film', '--light', 'D65', '--png-scale', '0.5', '--out', join(dir, 'p.png'));
    expect(withScale.status).toBe(0);
  });
  it('bad options are usage errors naming the option', () => {
    const flare = lamella('render', rampPath, '--stack', 'soap-film', '--light', 'D65', '--flare', '0.1,0.2', '--out', join(dir, 'x.png'));
    expect(flare.status).toBe(2);
    expect(flare.stderr).toContain('--flare must be one number or three comma-separated numbers');
    const jpeg16 = lamella('render', rampPath, '--stack', 'soap-film', '--light', 'D65', '--bit-depth', '16', '--out', join(dir, 'x.jpg'));
    expect(jpeg16.status).toBe(2);
    const light = lamella('render', rampPath, '--stack', 'soap-film', '--light', 'moon', '--out', join(dir, 'x.png'));
    expect(light.status).toBe(2);
    expect(light.stderr).toContain('unknown light "moon"');
  });
  it('a malformed camera file exits 3 naming the file and line', () => {
    const camera = join(dir, 'cam.csv');
    writeFileSync(camera, 'wavelength_nm,r,g,b\n400,1,1,1\n400,1,1,1\n700,1,1,1\n');
    const result = lamella('render', rampPath, '--stack', 'soap-film', '--light', 'D65', '--camera', camera, '--out', join(dir, 'x.png'));
    expect(result.status).toBe(3);
    expect(result.stderr.trim()).toBe(`lamella: ${camera}: line 3: column "wavelength_nm" must increase strictly, found 400 after 400`);
  });
});
