/**
 * Bad input across the commands, table-driven (spawned compiled CLI). Every bad file is made
 * inside this test. Each case checks the documented exit status (README "Exit statuses":
 * 2 usage, 3 failed input; src/cli/errors.ts), that the error is ONE line starting `lamella:`
 * naming the file or option (for `map`, one line for the photo plus the count of failed photos),
 * and that no stack trace is printed (only `--debug` shows one).
 *
 * Plausibility bounds used to catch wrong units are common practice: visible-light tables are
 * in nm (400–700), `valid_range_um` in µm, Sellmeier C in µm² (Malitson 1965's form for fused
 * silica, the schema of shared/materials). The good photo is an INVENTED soap-film wedge rendered
 * by our own forward model.
 */
import { spawn, spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MAP_MAX_PIXELS } from '../src/io/limits.js';
import { pngHeaderClaiming } from './png-header.js';
import { sampleField, shoot, writePhoto } from './map-scenes.js';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-hardening-bad-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const W = 64;
const H = 48;

interface Run {
  status: number | null;
  stdout: string;
  stderr: string;
}

function lamella(args: readonly string[]): Run {
  const r = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd: dir });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** The same, without blocking, so that the table's cases can run side by side. */
function lamellaAsync(args: readonly string[]): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [bin, ...args], { cwd: dir });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk: Buffer) => (stdout += chunk.toString()));
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}

/** A light or camera table 380–780 nm every 10 nm; `row(nm)` gives the values after the wavelength. */
function table(header: string, row: (nm: number) => string, toUnit = 1): string {
  const lines = [header];
  for (let nm = 380; nm <= 780; nm += 10) lines.push(`${nm * toUnit},${row(nm)}`);
  return `${lines.join('\n')}\n`;
}

const stack = (body: object): string => JSON.stringify({ name: 'test', ambient: 'air', substrate: 'air', ...body });
const fusedSilica = { formula: 'sellmeier', coefficients: { A: 0, B: [0.6961663, 0.4079426, 0.8974794], C: [0.0046791, 0.0135121, 97.934] }, valid_range_um: [0.21, 6.7] };

const files: Record<string, string | Buffer> = {
  'notes.txt': 'not an image\n',
  'empty.png': Buffer.alloc(0),
  'huge.png': pngHeaderClaiming(8000, 7000),
  'bmp-ish.jpg': Buffer.concat([Buffer.from('BM'), Buffer.alloc(60)]),
  'light-um.csv': table('wavelength_nm,relative_spd', () => '1', 1e-3),
  'light-nan.csv': table('wavelength_nm,relative_spd', (nm) => (nm === 550 ? 'NaN' : '1')),
  'light-negative.csv': table('wavelength_nm,relative_spd', (nm) => (nm === 600 ? '-0.2' : '1')),
  'light-short.csv': table('wavelength_nm,relative_spd', () => '1').split('\n').slice(0, 20).join('\n'),
  'light-decreasing.csv': 'wavelength_nm,relative_spd\n400,1\n500,1\n450,1\n700,1\n',
  'camera-um.csv': table('wavelength_nm,r,g,b', () => '0.2,0.5,0.3', 1e-3),
  'camera-3col.csv': table('wavelength_nm,r,g', () => '0.2,0.5'),
  'camera-inf.csv': table('wavelength_nm,r,g,b', (nm) => (nm === 500 ? '0.2,Infinity,0.3' : '0.2,0.5,0.3')),
  'stack-malformed.json': '{ "ambient": "air", "layers": [ ',
  'stack-no-layers.json': JSON.stringify({ ambient: 'air', substrate: 'si' }),
  'stack-no-film.json': stack({ layers: [{ material: 'water', thicknessNm: 100 }] }),
  'stack-negative.json': stack({ layers: [{ material: 'water', thicknessNm: 'film' }, { material: 'sio2', thicknessNm: -20 }] }),
  'stack-infinite.json': stack({ layers: [{ material: 'water', thicknessNm: 'film' }, { material: 'sio2', thicknessNm: 1e999 }] }).replace('null', '1e999'),
  'stack-nan-index.json': stack({ layers: [{ material: { n: 'NaN' }, thicknessNm: 'film' }] }),
  'stack-unknown-material.json': stack({ layers: [{ material: 'unobtainium', thicknessNm: 'film' }] }),
  'stack-missing-file.json': stack({ layers: [{ material: 'nowhere.csv', thicknessNm: 'film' }] }),
  'stack-range-nm.json': stack({ layers: [{ material: { ...fusedSilica, valid_range_um: [210, 6700] }, thicknessNm: 'film' }] }),
  'stack-sellmeier-nm2.json': stack({ layers: [{ material: { ...fusedSilica, coefficients: { ...fusedSilica.coefficients, C: [4679.1, 13512.1, 97934000] } }, thicknessNm: 'film' }] }),
  'nk-um.csv': 'wavelength_nm,n,k\n0.3,1.5,0\n0.8,1.45,0\n',
  'nk-negative-k.csv': 'wavelength_nm,n,k\n300,1.5,0\n500,1.48,-0.01\n800,1.45,0\n',
  'nk-header.csv': 'lambda,n,k\n300,1.5,0\n800,1.45,0\n',
  'nk-text.csv': 'wavelength_nm,n,k\n300,1.5,0\n500,one point five,0\n800,1.45,0\n',
  'material-no-formula.json': JSON.stringify({ coefficients: fusedSilica.coefficients, valid_range_um: [0.21, 6.7] }),
  'cal-malformed.json': '{"lamella_calibration": 1, "fitted": ',
  'cal-version.json': JSON.stringify({ lamella_calibration: 9, applies_to: { stack: 'soap-film', light: 'D65', angle_deg: 0 }, fitted: { exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] } }),
  'cal-no-fitted.json': JSON.stringify({ lamella_calibration: 1, applies_to: { stack: 'soap-film', light: 'D65', angle_deg: 0 } }),
  'cal-infinite.json': '{"lamella_calibration": 1, "applies_to": {"stack": "soap-film", "light": "D65", "angle_deg": 0}, "fitted": {"exposure": 1e999, "whiteBalance": [1,1,1], "flare": [0,0,0]}}',
  'thickness-bad.npy': Buffer.concat([Buffer.from([0x93]), Buffer.from('NUMPY garbage')]),
  'afile': 'x',
};

beforeAll(async () => {
  const truth = sampleField(W, H, (x, y) => 150 + 700 * (y / H) + 30 * Math.sin(x / 7));
  await writePhoto(join(dir, 'good.png'), shoot(truth, W, H, { stack: 'soap-film', exposure: 6, flare: 0.01, noise: 0.003 }), W, H, 'png');
  for (const [name, content] of Object.entries(files)) writeFileSync(join(dir, name), content);
  const png = readFileSync(join(dir, 'good.png'));
  writeFileSync(join(dir, 'truncated.png'), png.subarray(0, Math.floor(png.length / 2)));
  copyFileSync(join(dir, 'good.png'), join(dir, 'wrongly-named.tif'));
  await writePhoto(join(dir, 'dot.png'), shoot(Float32Array.of(400), 1, 1, { stack: 'soap-film', exposure: 6 }), 1, 1, 'png');
  const deep = shoot(truth, W, H, { stack: 'soap-film', exposure: 6, flare: 0.01, noise: 0.003, bitDepth: 16 }) as Uint16Array;
  const rgba = new Uint16Array(W * H * 4);
  for (let i = 0; i < W * H; i++) {
    rgba.set(deep.subarray(i * 3, i * 3 + 3), i * 4);
    rgba[i * 4 + 3] = i % W < 8 ? 0 : 65535; // a transparent strip on the left
  }
  await sharp(rgba, { raw: { width: W, height: H, channels: 4 } }).toColourspace('rgb16').png().toFile(join(dir, 'deep-alpha.png'));
  await sharp({ create: { width: 10, height: 10, channels: 3, background: '#808080' } }).png().toFile(join(dir, 'small-mask.png'));
  mkdirSync(join(dir, 'a-folder.png'));
  mkdirSync(join(dir, 'frames-huge'));
  writeFileSync(join(dir, 'frames-huge', 'huge.png'), pngHeaderClaiming(8000, 7000));
  mkdirSync(join(dir, 'frames-one-bad'));
  copyFileSync(join(dir, 'good.png'), join(dir, 'frames-one-bad', 'f1.png'));
  writeFileSync(join(dir, 'frames-one-bad', 'f2.png'), 'not an image');
  copyFileSync(join(dir, 'good.png'), join(dir, 'frames-one-bad', 'f3.png'));
  copyFileSync(join(dir, 'good.png'), join(dir, 'frames-one-bad', 'f4.png'));
});

interface Case {
  readonly name: string;
  readonly args: readonly string[];
  readonly status: 2 | 3;
  /** What the (first) error line must say: the file or option, and what was expected. */
  readonly message: RegExp;
  /** `map` reports each failed photo, then one line counting them. */
  readonly batch?: boolean;
}

const map = (photo: string, ...rest: string[]): string[] => ['map', photo, '--stack', 'soap-film', '--out', 'out-map', '--no-report', ...rest];
const spectrum = (...rest: string[]): string[] => ['spectrum', '--stack', 'soap-film', '--thickness', '100', ...rest];

const cases: Case[] = [
  // Photos
  { name: 'map: a missing photo', args: map('nosuch.png'), status: 3, message: /nosuch\.png: file not found/, batch: true },
  { name: 'map: an empty photo', args: map('empty.png'), status: 3, message: /empty\.png: file is empty/, batch: true },
  { name: 'map: a truncated PNG', args: map('truncated.png'), status: 3, message: /truncated\.png: .*(truncated|corrupt)/, batch: true },
  { name: 'map: a text file', args: map('notes.txt'), status: 3, message: /notes\.txt: is not an image/, batch: true },
  { name: 'map: a BMP-like file named .jpg', args: map('bmp-ish.jpg'), status: 3, message: /bmp-ish\.jpg: is not an image/, batch: true },
  { name: 'map: a folder named like a photo', args: map('a-folder.png'), status: 3, message: /a-folder\.png: is a folder/, batch: true },
  {
    name: `map: a photo over the ${MAP_MAX_PIXELS / 1e6} MP limit (8000×7000 header)`,
    args: map('huge.png'),
    status: 3,
    message: new RegExp(`huge\\.png: image has 8000×7000 pixels \\(56 MP\\), more than the limit of ${MAP_MAX_PIXELS} pixels`),
    batch: true,
  },
  {
    name: 'series: a frame over the pixel limit',
    args: ['series', 'frames-huge', '--stack', 'soap-film', '--fps', '1', '--quiet', '--no-report', '--out', 'out-huge'],
    status: 3,
    message: new RegExp(`^lamella: huge\\.png: image has 8000×7000 pixels \\(56 MP\\), more than the limit of ${MAP_MAX_PIXELS} pixels`),
  },
  { name: 'map: a mask of another size', args: map('good.png', '--mask', 'small-mask.png'), status: 3, message: /small-mask\.png: mask is 10×10 but the photo is 64×48/, batch: true },
  // Options
  { name: 'map: unknown option', args: map('good.png', '--thickness-max', '9'), status: 2, message: /unknown option '--thickness-max'/ },
  { name: 'map: --out missing', args: ['map', 'good.png', '--stack', 'soap-film'], status: 2, message: /required option '--out <dir>'/ },
  { name: 'map: no photo', args: ['map', '--stack', 'soap-film', '--out', 'o'], status: 2, message: /missing required argument 'photo'/ },
  { name: 'map: --thin-below negative', args: map('good.png', '--thin-below', '-5'), status: 2, message: /--thin-below must be a number of nm >= 0, received -5/ },
  { name: 'map: --film-index 0', args: map('good.png', '--film-index', '0'), status: 2, message: /--film-index: n must be a finite number > 0, received 0/ },
  { name: 'map: --out is a file', args: ['map', 'good.png', '--stack', 'soap-film', '--out', 'afile'], status: 3, message: /afile: output folder path is an existing file/ },
  { name: 'map: an unknown light', args: map('good.png', '--light', 'D66'), status: 2, message: /light must be D65, .*received|D66/ },
  { name: 'map: an unknown --white-balance', args: map('good.png', '--white-balance', 'D66'), status: 2, message: /^lamella: --white-balance: unknown light "D66"/ },
  { name: 'series: an unknown --white-balance (checked once, not per frame)', args: ['series', 'frames-one-bad', '--stack', 'soap-film', '--fps', '1', '--white-balance', 'D66', '--out', 'o'], status: 2, message: /^lamella: --white-balance: unknown light "D66"/ },
  { name: 'series: a light file in µm (checked once, not per frame)', args: ['series', 'frames-one-bad', '--stack', 'soap-film', '--fps', '1', '--light', 'light-um.csv', '--out', 'o'], status: 3, message: /light-um\.csv[:,] line \d+: wavelengths must be in nm/ },
  { name: 'calibrate: an unknown --light', args: ['calibrate', 'good.png', '--stack', 'soap-film', '--light', 'D66', '--known', '0,0,8,8=300', '--out', 'cal.json'], status: 2, message: /^lamella: --light: unknown light "D66"/ },
  { name: 'series: --workers 0', args: ['series', 'frames-one-bad', '--stack', 'soap-film', '--fps', '1', '--workers', '0', '--out', 'o'], status: 2, message: /--workers/ },
  { name: 'series: --shard 3/2', args: ['series', 'frames-one-bad', '--stack', 'soap-film', '--fps', '1', '--shard', '3/2', '--out', 'o'], status: 2, message: /--shard/ },
  { name: 'chart: --format svg', args: ['chart', '--stack', 'soap-film', '--light', 'D65', '--format', 'svg'], status: 2, message: /'--format <kind>' argument 'svg' is invalid/ },
  { name: 'spectrum: --thickness NaN', args: ['spectrum', '--stack', 'soap-film', '--thickness', 'NaN'], status: 2, message: /--thickness must be/ },
  // Light (SPD) files
  { name: 'light file in µm', args: map('good.png', '--light', 'light-um.csv'), status: 3, message: /light-um\.csv[:,] line \d+: wavelengths must be in nm.*micrometres/ },
  { name: 'light file with NaN', args: map('good.png', '--light', 'light-nan.csv'), status: 3, message: /light-nan\.csv[:,] line 19: column "relative_spd" must be a finite number, found "NaN"/ },
  { name: 'light file with a negative value', args: map('good.png', '--light', 'light-negative.csv'), status: 3, message: /light-negative\.csv[:,] line 24: relative_spd must be >= 0/ },
  { name: 'light file not reaching 700 nm', args: map('good.png', '--light', 'light-short.csv'), status: 3, message: /light-short\.csv[:,] line 20: the table must reach 700 nm/ },
  { name: 'light file not increasing', args: map('good.png', '--light', 'light-decreasing.csv'), status: 3, message: /light-decreasing\.csv[:,] line 4: column "wavelength_nm" must increase strictly/ },
  // Camera sensitivity files
  { name: 'camera file in µm', args: ['render', 'thickness-bad.npy', '--stack', 'soap-film', '--light', 'D65', '--camera', 'camera-um.csv', '--out', 'x.png'], status: 3, message: /camera-um\.csv[:,] line \d+: wavelengths must be in nm/ },
  { name: 'camera file with 3 columns', args: ['render', 'thickness-bad.npy', '--stack', 'soap-film', '--light', 'D65', '--camera', 'camera-3col.csv', '--out', 'x.png'], status: 3, message: /camera-3col\.csv[:,] line 1: expected a header of 4 columns/ },
  { name: 'camera file with Infinity', args: ['render', 'thickness-bad.npy', '--stack', 'soap-film', '--light', 'D65', '--camera', 'camera-inf.csv', '--out', 'x.png'], status: 3, message: /camera-inf\.csv[:,] line 14: column "g" must be a finite number, found "Infinity"/ },
  { name: 'render: a malformed .npy', args: ['render', 'thickness-bad.npy', '--stack', 'soap-film', '--light', 'D65', '--out', 'x.png'], status: 3, message: /thickness-bad\.npy/ },
  { name: 'render: --out of an unknown type', args: ['render', 'good.png', '--stack', 'soap-film', '--light', 'D65', '--out', 'x.bmp'], status: 2, message: /--out must end in \.png/ },
  { name: 'chart: --out in a missing folder', args: ['chart', '--stack', 'soap-film', '--light', 'D65', '--format', 'png', '--out', 'nodir/c.png'], status: 3, message: /nodir\/c\.png: cannot write output file \(the folder does not exist, ENOENT\)/ },
  // Stack files
  { name: 'stack file: malformed JSON', args: spectrum('--stack', 'stack-malformed.json'), status: 3, message: /stack-malformed\.json: not valid JSON/ },
  { name: 'stack file: no layers', args: spectrum('--stack', 'stack-no-layers.json'), status: 3, message: /stack-no-layers\.json: missing field "layers"/ },
  { name: 'stack file: no film layer', args: spectrum('--stack', 'stack-no-film.json'), status: 3, message: /stack-no-film\.json: layers: at least one layer must have "thicknessNm": "film"/ },
  { name: 'stack file: negative thickness', args: spectrum('--stack', 'stack-negative.json'), status: 3, message: /stack-negative\.json: layers\[1\]\.thicknessNm must be "film" or a finite number >= 0, received -20/ },
  { name: 'stack file: thickness 1e999 (Infinity)', args: spectrum('--stack', 'stack-infinite.json'), status: 3, message: /stack-infinite\.json: layers\[1\]\.thicknessNm must be "film" or a finite number/ },
  { name: 'stack file: NaN index', args: spectrum('--stack', 'stack-nan-index.json'), status: 3, message: /stack-nan-index\.json: layers\[0\]\.material\.n must be a finite number > 0/ },
  { name: 'stack file: unknown material', args: spectrum('--stack', 'stack-unknown-material.json'), status: 3, message: /stack-unknown-material\.json: layers\[0\]\.material: unknown material "unobtainium"/ },
  { name: 'stack file: missing material file', args: spectrum('--stack', 'stack-missing-file.json'), status: 3, message: /nowhere\.csv: file not found \(referred to by stack-missing-file\.json, layers\[0\]\.material\)/ },
  { name: 'stack file: valid_range_um given in nm', args: spectrum('--stack', 'stack-range-nm.json'), status: 3, message: /stack-range-nm\.json: layers\[0\]\.material: valid_range_um must be in micrometres.*nanometres/ },
  { name: 'stack file: Sellmeier C in nm²', args: spectrum('--stack', 'stack-sellmeier-nm2.json'), status: 3, message: /stack-sellmeier-nm2\.json: layers\[0\]\.material: coefficients give n = 0\.99\d* at 380 nm.*C in µm²/ },
  // Material files
  { name: 'material CSV in µm', args: spectrum('--film-index', 'nk-um.csv'), status: 3, message: /nk-um\.csv: wavelength_nm must be in nanometres, received 0\.3–0\.8/ },
  { name: 'material CSV with negative k', args: spectrum('--film-index', 'nk-negative-k.csv'), status: 3, message: /nk-negative-k\.csv: line 3: k must be >= 0, received -0\.01/ },
  { name: 'material CSV with a wrong header', args: spectrum('--film-index', 'nk-header.csv'), status: 3, message: /nk-header\.csv: line 1: expected the header "wavelength_nm,n,k"/ },
  { name: 'material CSV with text for a number', args: spectrum('--film-index', 'nk-text.csv'), status: 3, message: /nk-text\.csv: line 3: n must be a finite number > 0, received text of 14 characters/ },
  { name: 'material JSON without formula', args: spectrum('--film-index', 'material-no-formula.json'), status: 3, message: /material-no-formula\.json: missing field "formula"/ },
  // Calibration files
  { name: 'calibration: malformed JSON', args: map('good.png', '--calibration', 'cal-malformed.json'), status: 3, message: /cal-malformed\.json: calibration file is not valid JSON/ },
  { name: 'calibration: another format version', args: map('good.png', '--calibration', 'cal-version.json'), status: 3, message: /cal-version\.json: lamella_calibration must be 1 .*received 9/ },
  { name: 'calibration: no fitted block', args: map('good.png', '--calibration', 'cal-no-fitted.json'), status: 3, message: /cal-no-fitted\.json: missing field "fitted"/ },
  { name: 'calibration: exposure 1e999', args: map('good.png', '--calibration', 'cal-infinite.json'), status: 3, message: /cal-infinite\.json: fitted\.exposure must be a finite number > 0, received Infinity/ },
  { name: 'series: calibration of another version', args: ['series', 'frames-one-bad', '--stack', 'soap-film', '--fps', '1', '--calibration', 'cal-version.json', '--out', 'o'], status: 3, message: /cal-version\.json: lamella_calibration must be 1/ },
];

describe('bad input: exit status, one line naming the file or option, no stack trace', () => {
  it.concurrent.for(cases)('$name → exit $status', async (c, { expect }) => {
    // Each case writes to its own folder: cases run at once, and a map whose every photo
    // failed removes the output folder it made, which would pull the folder from under another.
    const own = `-${cases.indexOf(c)}`;
    const args = c.args.map((a) => (a === 'out-map' || a === 'o' || a === 'out-huge' ? a + own : a));
    const r = await lamellaAsync(args);
    expect(r.status, r.stderr).toBe(c.status);
    const lines = r.stderr.split('\n').filter((l) => l !== '' && !l.startsWith('lamella: warning:'));
    expect(lines.length, r.stderr).toBe(c.batch ? 2 : 1);
    for (const line of lines) expect(line.startsWith('lamella: ')).toBe(true);
    expect(lines[0]).toMatch(c.message);
    if (c.batch) expect(lines[1]).toBe('lamella: 1 of 1 photo(s) failed');
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(r.stderr).not.toMatch(/Error:|node:internal/);
  });

  it('--debug adds the stack trace after the one-line message', () => {
    const r = lamella(['--debug', ...spectrum('--stack', 'stack-negative.json')]);
    expect(r.status).toBe(3);
    expect(r.stderr.split('\n')[0]).toMatch(/^lamella: stack-negative\.json: /);
    expect(r.stderr).toMatch(/^\s+at /m);
  });
});

describe('valid but unusual input is not refused', () => {
  it.each([
    ['a 1×1 photo', 'dot.png'],
    ['a 16-bit photo with an alpha channel', 'deep-alpha.png'],
  ])('%s: exit 0 and every output written', async (_what, name) => {
    if (name === 'deep-alpha.png') {
      const meta = await sharp(join(dir, name)).metadata();
      expect([meta.depth, meta.channels]).toEqual(['ushort', 4]);
    }
    const r = lamella(['map', name, '--stack', 'soap-film', '--out', 'out-unusual', '--quiet']);
    expect(r.status, r.stderr).toBe(0);
    const stem = name.replace(/\.png$/, '');
    for (const suffix of ['.thickness.npy', '.thickness.tif', '.confidence.npy', '.status.npy', '.map.png', '.flags.png', '.json', '.report.html']) {
      expect(existsSync(join(dir, 'out-unusual', stem + suffix)), stem + suffix).toBe(true);
    }
  });

  it('a PNG named .tif is read by its content', () => {
    const r = lamella(map('wrongly-named.tif', '--quiet'));
    expect(r.status, r.stderr).toBe(0);
    expect(existsSync(join(dir, 'out-map', 'wrongly-named.thickness.npy'))).toBe(true);
  });
});

describe('batches go on past a bad file and report it at the end', () => {
  it('map: good, missing, over-limit and text photos → the good ones mapped, each bad one named, exit 3', () => {
    const r = lamella(['map', 'good.png', 'nosuch.png', 'huge.png', 'wrongly-named.tif', 'notes.txt', '--stack', 'soap-film', '--out', 'out-batch', '--no-report', '--quiet']);
    expect(r.status).toBe(3);
    const lines = r.stderr.split('\n').filter((l) => l !== '');
    expect(lines).toHaveLength(4);
    expect(lines[0]).toMatch(/^lamella: nosuch\.png: file not found$/);
    expect(lines[1]).toMatch(/^lamella: huge\.png: image has 8000×7000 pixels/);
    expect(lines[2]).toMatch(/^lamella: notes\.txt: is not an image/);
    expect(lines[3]).toBe('lamella: 3 of 5 photo(s) failed: nosuch.png, huge.png, notes.txt');
    for (const stem of ['good', 'wrongly-named']) expect(existsSync(join(dir, 'out-batch', `${stem}.json`))).toBe(true);
    for (const stem of ['nosuch', 'huge', 'notes']) expect(existsSync(join(dir, 'out-batch', `${stem}.json`))).toBe(false);
  });

  it('series: a frame that is not an image is named, the other three are mapped and keep their times, exit 3', () => {
    const r = lamella(['series', 'frames-one-bad', '--stack', 'soap-film', '--fps', '1', '--workers', '1', '--no-report', '--quiet', '--out', 'out-series']);
    expect(r.status).toBe(3);
    const lines = r.stderr.split('\n').filter((l) => l !== '');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^lamella: \S*f2\.png: is not an image/);
    const rows = readFileSync(join(dir, 'out-series', 'series.csv'), 'utf8').trim().split('\n').slice(1).map((line) => line.split(','));
    // At 1 frame/s the fourth frame was taken 3 s after the first, whether or not the second one can be read.
    expect(rows.map((cells) => [cells[0], cells[1]])).toEqual([['f1.png', '0.000'], ['f3.png', '2.000'], ['f4.png', '3.000']]);
    for (const cells of rows) expect(Number(cells[2])).toBeGreaterThan(0);
  });
});
