// A light field fitted by `lamella calibrate` on known regions spread over the photo, stored in the
// calibration file and applied by `map --calibration` to other photos of the same station (same
// photo size; another size is refused). Round trips through our own forward model (lamella
// render): the scene is invented — a coating lab's fixed inspection station, a ring light that
// falls off by 35 % along a tilted direction, times lens vignetting of the cos⁴ form (cos⁴ law of
// illumination, common practice) scaled to 25 % at the corners; a step wafer of 12 oxide patches
// as the reference, then a production wafer with a bowl-shaped oxide, both photographed as 8-bit
// PNGs by a camera encoding sRGB (IEC 61966-2-1). The uneven light is applied to the rendered
// linear values here, as the lamp and the lens apply it to the light.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { encodeNpy } from '../src/io/encodeNpy.js';
import { readPhoto } from '../src/io/readPhoto.js';
import { encodeSrgb } from '../src/colour/srgb.js';
import { relativeGainAt } from '../src/map/lightEvenness.js';
import { unevenGainAt } from './uneven-light.js';
import { EVERYDAY_STYLE, applyStyle } from './response-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-cal-field-'));
const W = 240;
const H = 180;

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: dir });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

function decodeNpyFloat(buf: Buffer): Float32Array {
  const headerLength = buf.readUInt16LE(8);
  return new Float32Array(buf.buffer.slice(buf.byteOffset + 10 + headerLength, buf.byteOffset + buf.length));
}

/** Relative light at (x, y) of a width × height photo (./uneven-light.ts). */
function gainAt(x: number, y: number, width = W, height = H): number {
  return unevenGainAt(x, y, width, height);
}

/** Step wafer: 4 × 3 patches of known oxide thickness, 4 px lanes of 60 nm oxide between them. */
const STEPS_NM = [120, 190, 260, 330, 400, 470, 540, 610, 680, 750, 820, 890];
const COLS = 4;
const ROWS = 3;
function patchOf(x: number, y: number): number {
  const cw = W / COLS;
  const ch = H / ROWS;
  const cx = Math.floor(x / cw);
  const cy = Math.floor(y / ch);
  if (x - cx * cw < 4 || y - cy * ch < 4) return -1;
  return cy * COLS + cx;
}
/** --known rectangles: the middle of each patch. */
function knownArgs(which: readonly number[] = STEPS_NM.map((_, k) => k)): string[] {
  const cw = W / COLS;
  const ch = H / ROWS;
  return which.flatMap((k) => {
    const cx = k % COLS;
    const cy = Math.floor(k / COLS);
    return ['--known', `${Math.round(cx * cw + 16)},${Math.round(cy * ch + 16)},${Math.round(cw - 28)},${Math.round(ch - 28)}=${STEPS_NM[k]}`];
  });
}

const production = new Float32Array(W * H);

/** Renders a thickness map as a linear 16-bit TIFF, applies the light, writes an 8-bit sRGB PNG. */
async function photograph(truth: Float32Array, name: string, width: number, height: number, lit: boolean, exposure: number, styled = false): Promise<void> {
  writeFileSync(join(dir, `${name}.npy`), encodeNpy(truth, [height, width]));
  const r = lamella('render', `${name}.npy`, '--stack', 'oxide-on-silicon', '--light', 'F11', '--camera', 'linear', '--exposure', String(exposure), '--noise', '0.002', '--out', `${name}.linear.tif`);
  expect(r.status, r.stderr).toBe(0);
  const linear = await readPhoto(join(dir, `${name}.linear.tif`));
  const encoded = new Float64Array(width * height * 3);
  for (let i = 0; i < width * height; i++) {
    const g = lit ? gainAt(i % width, Math.floor(i / width), width, height) : 1;
    // Veiling glare of 0.4 % of full scale, added after the lamp's fall-off (common practice).
    for (let c = 0; c < 3; c++) encoded[i * 3 + c] = encodeSrgb(Math.min(1, linear.rgb[i * 3 + c] * g + 0.004));
  }
  // The camera's picture style on the encoded values (./response-scenes.ts: not the fit's family).
  if (styled) applyStyle(encoded, EVERYDAY_STYLE);
  const out = Buffer.alloc(width * height * 3);
  for (let i = 0; i < encoded.length; i++) out[i] = Math.round(255 * encoded[i]);
  await sharp(out, { raw: { width, height, channels: 3 } }).png().toFile(join(dir, `${name}.png`));
}

beforeAll(async () => {
  const steps = new Float32Array(W * H);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
    const k = patchOf(x, y);
    steps[y * W + x] = k < 0 ? 60 : STEPS_NM[k];
  }
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
    const r = Math.hypot(x - W / 2, y - H / 2) / Math.hypot(W / 2, H / 2);
    production[y * W + x] = 520 - 180 * r * r + 12 * Math.sin(x / 23);
  }
  await photograph(steps, 'steps', W, H, true, 1.6);
  await photograph(steps, 'steps-even', W, H, false, 1.6);
  await photograph(production, 'wafer', W, H, true, 1.6);
  // The same station through a camera with an everyday picture style (S-curve, saturation ×1.25).
  await photograph(steps, 'steps-styled', W, H, true, 1.6, true);
  await photograph(production, 'wafer-styled', W, H, true, 1.6, true);
  // The same station's camera with a smaller crop: another photo size.
  const small = new Float32Array(200 * 150);
  for (let i = 0; i < small.length; i++) small[i] = 450;
  await photograph(small, 'crop', 200, 150, true, 1.6);
}, 120_000);

const base = ['--stack', 'oxide-on-silicon', '--light', 'F11'];

describe('calibrate: the light field on known regions spread over the photo', () => {
  it('12 patches over the photo: a field (quadratic, with the radial r⁴ of vignetting when the patches pin it down) that follows the true light within 5 %, stored with the photo size', () => {
    const r = lamella('calibrate', 'steps.png', ...base, ...knownArgs(), '--out', 'cal.json');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/light field +(radial|quadratic), relative gain 0\.\d{3}–1\.\d{3} over the photo/);
    const cal = JSON.parse(readFileSync(join(dir, 'cal.json'), 'utf8'));
    const field = cal.exposure_field;
    expect(['radial', 'quadratic']).toContain(field.fitted_terms);
    expect(field.photo_size_px).toEqual([W, H]);
    expect(field.log_gain_coefficients[0]).toBe(0);
    // Against the true light, both relative to the photo's centre, over the known regions' hull.
    let worst = 0;
    for (let y = 20; y < H - 20; y += 10) for (let x = 20; x < W - 20; x += 10) {
      const fitted = relativeGainAt(field.log_gain_coefficients, W, H, x, y) / relativeGainAt(field.log_gain_coefficients, W, H, W / 2 - 0.5, H / 2 - 0.5);
      const ratio = fitted / (gainAt(x, y) / gainAt(W / 2 - 0.5, H / 2 - 0.5));
      worst = Math.max(worst, Math.abs(ratio - 1));
    }
    expect(worst).toBeLessThanOrEqual(0.05);
    // Every patch is explained: residuals below a just-noticeable difference (ΔE2000 ≈ 1, common practice).
    for (const k of cal.known_regions) expect(k.residual_delta_e2000).toBeLessThan(1);
  }, 60_000);

  it('an evenly lit station: the fitted field stays flat within ±2 %', () => {
    const r = lamella('calibrate', 'steps-even.png', ...base, ...knownArgs(), '--out', 'cal-even.json');
    expect(r.status, r.stderr).toBe(0);
    const field = JSON.parse(readFileSync(join(dir, 'cal-even.json'), 'utf8')).exposure_field;
    expect(['radial', 'quadratic']).toContain(field.fitted_terms);
    expect(field.relative_gain_min).toBeGreaterThanOrEqual(0.98);
    expect(field.relative_gain_max).toBeLessThanOrEqual(1.02);
  }, 60_000);

  it('regions bunched in the middle: no field, and the file says why', () => {
    const r = lamella('calibrate', 'steps.png', ...base, ...knownArgs([5, 6]), '--out', 'cal-middle.json');
    expect(r.status, r.stderr).toBe(0);
    const field = JSON.parse(readFileSync(join(dir, 'cal-middle.json'), 'utf8')).exposure_field;
    expect(field.log_gain_coefficients).toBeNull();
    expect(field.note).toMatch(/known regions span \d+ % of the width and \d+ % of the height/);
    expect(r.stdout).toContain('light field    not fitted');
  }, 60_000);

  it('--light-field off: one exposure, said so', () => {
    const r = lamella('calibrate', 'steps.png', ...base, ...knownArgs(), '--light-field', 'off', '--out', 'cal-off.json');
    expect(r.status, r.stderr).toBe(0);
    expect(JSON.parse(readFileSync(join(dir, 'cal-off.json'), 'utf8')).exposure_field.note).toContain('light field off');
  }, 60_000);
});

describe('map --calibration applies the stored field to another photo of the same station', () => {
  function errors(out: string): { gross: number; p95: number; coverage: number } {
    const map = decodeNpyFloat(readFileSync(join(dir, out, 'wafer.thickness.npy')));
    const diffs: number[] = [];
    for (let i = 0; i < map.length; i++) if (Number.isFinite(map[i])) diffs.push(Math.abs(map[i] - production[i]));
    diffs.sort((a, b) => a - b);
    return { gross: diffs.filter((d) => d > 50).length / map.length, p95: diffs[Math.floor(0.95 * (diffs.length - 1))], coverage: diffs.length / map.length };
  }

  it('the production wafer meets the targets (gross ≤ 1 %, p95 ≤ 15 nm, coverage ≥ 95 %) and the JSON names the field\'s source', () => {
    const r = lamella('map', 'wafer.png', ...base, '--calibration', 'cal.json', '--film-area', 'whole', '--out', 'm', '--no-report');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toContain("over uneven light (calibration's field");
    const e = errors('m');
    expect(e.coverage).toBeGreaterThanOrEqual(0.95);
    expect(e.gross).toBeLessThanOrEqual(0.01);
    expect(e.p95).toBeLessThanOrEqual(15);
    const record = JSON.parse(readFileSync(join(dir, 'm', 'wafer.json'), 'utf8'));
    expect(record.exposure_field.source).toContain('calibration');
    expect(record.exposure_field.rounds).toBe(0);
  }, 60_000);

  it('the same calibration without its field (--light-field off at calibration) maps the wafer clearly worse', () => {
    const r = lamella('map', 'wafer.png', ...base, '--calibration', 'cal-off.json', '--film-area', 'whole', '--out', 'm-off', '--no-report');
    expect(r.status, r.stderr).toBe(0);
    const withField = errors('m');
    const without = errors('m-off');
    expect(without.p95).toBeGreaterThan(2 * withField.p95);
  }, 60_000);

  it('a station with uneven light and a picture style: calibrate fits both (--fit …,response), and the production wafer mapped with them meets the targets', () => {
    const c = lamella('calibrate', 'steps-styled.png', ...base, ...knownArgs(), '--fit', 'exposure,white-balance,flare,response', '--out', 'cal-styled.json');
    expect(c.status, c.stderr).toBe(0);
    const cal = JSON.parse(readFileSync(join(dir, 'cal-styled.json'), 'utf8'));
    expect(['radial', 'quadratic']).toContain(cal.exposure_field.fitted_terms);
    expect(Math.abs(cal.fitted.response.saturation - EVERYDAY_STYLE.saturation)).toBeLessThanOrEqual(0.08);
    const r = lamella('map', 'wafer-styled.png', ...base, '--calibration', 'cal-styled.json', '--film-area', 'whole', '--out', 'm-styled', '--no-report');
    expect(r.status, r.stderr).toBe(0);
    const record = JSON.parse(readFileSync(join(dir, 'm-styled', 'wafer-styled.json'), 'utf8'));
    expect(record.response.source).toBe('calibration');
    expect(record.exposure_field.source).toContain('calibration');
    const map = decodeNpyFloat(readFileSync(join(dir, 'm-styled', 'wafer-styled.thickness.npy')));
    const diffs: number[] = [];
    for (let i = 0; i < map.length; i++) if (Number.isFinite(map[i])) diffs.push(Math.abs(map[i] - production[i]));
    diffs.sort((a, b) => a - b);
    expect(diffs.length / map.length).toBeGreaterThanOrEqual(0.95);
    expect(diffs.filter((d) => d > 50).length / map.length).toBeLessThanOrEqual(0.01);
    expect(diffs[Math.floor(0.95 * (diffs.length - 1))]).toBeLessThanOrEqual(15);
  }, 90_000);

  it('a photo of another size is refused (exit 2, both sizes named) unless --ignore-calibration-mismatch', () => {
    const r = lamella('map', 'crop.png', ...base, '--calibration', 'cal.json', '--out', 'c', '--no-report');
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(`fitted on a ${W}×${H} photo, this photo is 200×150`);
    expect(r.stderr).toContain('--ignore-calibration-mismatch');
    const forced = lamella('map', 'crop.png', ...base, '--calibration', 'cal.json', '--ignore-calibration-mismatch', '--out', 'c2', '--no-report');
    expect(forced.status, forced.stderr).toBe(0);
  }, 60_000);

  it('a damaged field in the calibration file: exit 3 naming the file and the field', () => {
    const cal = JSON.parse(readFileSync(join(dir, 'cal.json'), 'utf8'));
    cal.exposure_field.log_gain_coefficients = [0, 1, 'x'];
    writeFileSync(join(dir, 'bad-cal.json'), JSON.stringify(cal));
    const r = lamella('map', 'wafer.png', ...base, '--calibration', 'bad-cal.json', '--out', 'b', '--no-report');
    expect(r.status).toBe(3);
    expect(r.stderr).toContain('bad-cal.json');
    expect(r.stderr).toContain('exposure_field.log_gain_coefficients');
  }, 60_000);
});
