// The light-evenness check (src/map/lightEvenness.ts): a photo lit unevenly is said to be so, an
// evenly lit one is not. Round trips through our own forward model (lamella render): the scene
// is invented — a lab's draining soap film lit by a diffuse panel from one side, photographed
// as a linear 16-bit TIFF — and the fall-off is applied to the rendered linear values here:
// a 35 % drop along a tilted direction times lens vignetting of the cos⁴ form (cos⁴ law of
// illumination, common practice) scaled to 25 % at the corners.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { encodeNpy } from '../src/io/encodeNpy.js';
import { encodeTiff } from '../src/io/encodeImage.js';
import { readPhoto } from '../src/io/readPhoto.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-evenness-'));
const W = 240;
const H = 180;

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: dir });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Relative light at (x, y): tilted 35 % fall-off × vignetting (25 % at the corners). */
function gainAt(x: number, y: number): number {
  const u = x / (W - 1);
  const v = y / (H - 1);
  const along = 0.8 * u + 0.6 * v - 0.1 * Math.min(u, v);
  const falloff = 1 - 0.35 * Math.min(1, Math.max(0, along / 1.3));
  const rNorm = Math.hypot(x - W / 2, y - H / 2) / Math.hypot(W / 2, H / 2);
  const theta = Math.atan(rNorm * Math.tan(Math.acos(Math.pow(0.75, 0.25))));
  return falloff * Math.pow(Math.cos(theta), 4);
}

beforeAll(async () => {
  const truth = new Float32Array(W * H);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) truth[y * W + x] = 60 + 1000 * Math.pow(y / (H - 1), 1.2) + 30 * Math.sin(x / 19 + y / 41);
  writeFileSync(join(dir, 'film.npy'), encodeNpy(truth, [H, W]));
  const render = lamella('render', 'film.npy', '--stack', 'soap-film', '--light', 'D65', '--camera', 'linear', '--exposure', '0.9', '--flare', '0.003', '--noise', '0.002', '--out', 'even.tif');
  expect(render.status, render.stderr).toBe(0);
  const even = await readPhoto(join(dir, 'even.tif'));
  expect(even.bitDepth).toBe(16);
  const uneven = new Uint16Array(W * H * 3);
  for (let i = 0; i < W * H; i++) {
    const g = gainAt(i % W, Math.floor(i / W));
    for (let c = 0; c < 3; c++) uneven[i * 3 + c] = Math.round(even.rgb[i * 3 + c] * 65535 * g);
  }
  writeFileSync(join(dir, 'uneven.tif'), await encodeTiff({ data: uneven, width: W, height: H, channels: 3 }));
}, 60_000);

describe('light evenness (JSON light_evenness and a plain-words warning)', () => {
  it('an evenly lit photo: gains within ±5 % of the median, no warning', () => {
    const r = lamella('map', 'even.tif', '--stack', 'soap-film', '--light', 'D65', '--camera', 'linear', '--film-area', 'whole', '--out', 'e', '--no-report');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).not.toContain('light on the film is uneven');
    const record = JSON.parse(readFileSync(join(dir, 'e', 'even.json'), 'utf8'));
    expect(record.light_evenness.relative_gain_min).toBeGreaterThanOrEqual(0.95);
    expect(record.light_evenness.relative_gain_max).toBeLessThanOrEqual(1.05);
  }, 60_000);

  it('a photo with a 35 % fall-off and vignetting: the warning says the light is uneven, and the range shows it', () => {
    const r = lamella('map', 'uneven.tif', '--stack', 'soap-film', '--light', 'D65', '--camera', 'linear', '--film-area', 'whole', '--out', 'u', '--no-report');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toContain('the light on the film is uneven');
    const record = JSON.parse(readFileSync(join(dir, 'u', 'uneven.json'), 'utf8'));
    expect(record.light_evenness.relative_gain_max / record.light_evenness.relative_gain_min).toBeGreaterThan(1.15);
  }, 60_000);
});
