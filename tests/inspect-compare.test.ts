/**
 * `lamella compare` (issue 19 part 6): after − before of two maps, a rate with --duration, a known
 * offset with --shift, the figures against a direct computation, two rendered wafers with a known
 * etch pattern (INVENTED scenes, tests/inspect-scenes.ts: mapping them is a round trip through our
 * own model), and bad input. Uniformity definitions: common practice (see tests/inspect.test.ts).
 */
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeNpy } from '../src/io/decodeNpy.js';
import { encodeNpy } from '../src/io/encodeNpy.js';
import { afterEtchNm, beforeEtchNm, DISC, discOnChuck, etchRemovedNm } from './inspect-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const bin = join(root, 'bin', 'lamella.js');
const dir = mkdtempSync(join(tmpdir(), 'lamella-compare-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Run { status: number | null; stdout: string; stderr: string }
const cli = (...args: string[]): Run => spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
function cliAsync(...args: string[]): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [bin, ...args], { cwd: dir });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}
const W = 480;
const H = 360;

/** A field sampled at pixel centres on the disc (NaN off it), shifted by (dx, dy). */
function grid(fn: (x: number, y: number) => number, dx = 0, dy = 0): Float32Array {
  const out = new Float32Array(W * H).fill(Number.NaN);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const u = x - dx + 0.5;
      const v = y - dy + 0.5;
      if (Math.hypot(u - DISC.cx, v - DISC.cy) <= DISC.radiusPx) out[y * W + x] = fn(u, v);
    }
  }
  return out;
}
const readGrid = (path: string): Float32Array => decodeNpy(readFileSync(join(dir, path)), path).data as Float32Array;

const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
const validate = ajv.compile(JSON.parse(readFileSync(join(root, 'schemas', 'compare.schema.json'), 'utf8')));

describe('compare two maps', () => {
  beforeAll(() => {
    writeFileSync(join(dir, 'before.npy'), encodeNpy(grid(beforeEtchNm), [H, W]));
    writeFileSync(join(dir, 'after.npy'), encodeNpy(grid(afterEtchNm), [H, W]));
    writeFileSync(join(dir, 'after-shifted.npy'), encodeNpy(grid(afterEtchNm, 3, -2), [H, W]));
    writeFileSync(join(dir, 'small.npy'), encodeNpy(new Float32Array(100 * 80).fill(1), [80, 100]));
  });

  it('the difference is after − before at every pixel; the rate is it per minute; the figures equal a direct computation', () => {
    const r = cli('compare', 'before.npy', 'after.npy', '--out', 'etch', '--duration', '90');
    expect(r.status, r.stderr).toBe(0);
    const before = grid(beforeEtchNm);
    const after = grid(afterEtchNm);
    const diff = readGrid('etch/difference.npy');
    const rate = readGrid('etch/rate.npy');
    const removed: number[] = [];
    for (let i = 0; i < diff.length; i++) {
      const d = after[i] - before[i];
      if (Number.isNaN(d)) { expect(diff[i]).toBeNaN(); continue; }
      expect(diff[i]).toBe(Math.fround(d));
      expect(rate[i]).toBeCloseTo((d * 60) / 90, 4);
      removed.push(-d);
    }
    const record = JSON.parse(readFileSync(join(dir, 'etch', 'compare.json'), 'utf8'));
    expect(validate(record), JSON.stringify(validate.errors)).toBe(true);
    const n = removed.length;
    const mean = removed.reduce((a, b) => a + b, 0) / n;
    const min = Math.min(...removed);
    const max = Math.max(...removed);
    const std = Math.sqrt(removed.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1));
    expect(record.compared_px).toBe(n);
    expect(record.change).toBe('removed');
    expect(record.statistics_nm.mean_nm).toBeCloseTo(-mean, 3);
    expect(record.rate_statistics_nm_per_min.mean_nm).toBeCloseTo((-mean * 60) / 90, 3);
    // The truth: 100 nm removed, 160 nm in the window.
    expect(min).toBeCloseTo(100, 3);
    expect(max).toBeCloseTo(160, 3);
    expect(record.uniformity.range_over_twice_mean).toBeCloseTo((max - min) / (2 * mean), 6);
    expect(record.uniformity.std_over_mean).toBeCloseTo(std / mean, 6);
    expect(record.uniformity.range_over_sum).toBeCloseTo((max - min) / (max + min), 6);
    expect(r.stdout).toMatch(/mean -1\d\d\.\d nm/);
    const html = readFileSync(join(dir, 'etch', 'report.html'), 'utf8');
    expect(html).toContain('(max-min)/(2*mean)');
    expect(html).toContain('data:image/png;base64,');
  });

  it('--shift DX,DY lines up an after map taken 3 px right and 2 px up', () => {
    const plain = cli('compare', 'before.npy', 'after-shifted.npy', '--out', 'shifted-plain', '--json');
    const shifted = cli('compare', 'before.npy', 'after-shifted.npy', '--out', 'shifted', '--shift', '3,-2', '--json');
    expect(shifted.status, shifted.stderr).toBe(0);
    const s = JSON.parse(shifted.stdout);
    const p = JSON.parse(plain.stdout);
    expect(s.shift_px).toEqual([3, -2]);
    expect(s.statistics_nm.min_nm).toBeCloseTo(-160, 3);
    expect(s.statistics_nm.max_nm).toBeCloseTo(-100, 3);
    // Aligned, every compared pixel shows the etch of its own place; unaligned, the window's edges do not.
    const wrong = (path: string): number => {
      const d = readGrid(path);
      let count = 0;
      for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) if (Number.isFinite(d[y * W + x]) && Math.abs(d[y * W + x] + etchRemovedNm(x + 0.5, y + 0.5)) > 1) count++;
      return count;
    };
    expect(wrong('shifted/difference.npy')).toBe(0);
    expect(wrong('shifted-plain/difference.npy')).toBeGreaterThan(400);
    expect(p.shift_px).toEqual([0, 0]);
  });

  it('maps of different sizes: exit 2 naming both sizes; a photo without --stack: exit 2; a missing map: exit 3', () => {
    const sizes = cli('compare', 'before.npy', 'small.npy', '--out', 'bad');
    expect(sizes.status).toBe(2);
    expect(sizes.stderr).toMatch(/differ in size: before\.npy is 480×360, small\.npy is 100×80/);
    const photo = cli('compare', 'before.npy', 'after.jpg', '--out', 'bad');
    expect(photo.status).toBe(2);
    expect(photo.stderr).toMatch(/after\.jpg is a photo; give --stack/);
    const missing = cli('compare', 'before.npy', 'nothing.npy', '--out', 'bad');
    expect(missing.status).toBe(3);
    expect(missing.stderr).toMatch(/nothing\.npy/);
    const shift = cli('compare', 'before.npy', 'after.npy', '--out', 'bad', '--shift', '1.5,2');
    expect(shift.status).toBe(2);
    expect(shift.stderr).toMatch(/--shift/);
  });
});

describe('compare two photos of rendered wafers with a known etch pattern (invented; a round trip through our own model)', () => {
  it('mapped alike, the change is −100 nm off the window and −160 nm in it (±5 nm, medians)', async () => {
    writeFileSync(join(dir, 'before.jpg'), (await discOnChuck('before', beforeEtchNm, 1911)).photo);
    writeFileSync(join(dir, 'after.jpg'), (await discOnChuck('after', afterEtchNm, 1912)).photo);
    const r = await cliAsync('compare', 'before.jpg', 'after.jpg', '--stack', 'oxide-on-silicon', '--light', 'F11', '--expect', '300-560', '--out', 'photos', '--duration', '120');
    expect(r.status, r.stderr).toBe(0);
    const diff = readGrid('photos/difference.npy');
    const inWindow: number[] = [];
    const outside: number[] = [];
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const d = diff[y * W + x];
        if (!Number.isFinite(d)) continue;
        // Away from the window's edges and the wafer's rim by 3 px.
        const inner = Math.hypot(x + 0.5 - DISC.cx, y + 0.5 - DISC.cy) < DISC.radiusPx - 3;
        const nearEdge = [190, 290].some((e) => Math.abs(x + 0.5 - e) < 3) || [130, 230].some((e) => Math.abs(y + 0.5 - e) < 3);
        if (!inner || nearEdge) continue;
        (etchRemovedNm(x + 0.5, y + 0.5) === 160 ? inWindow : outside).push(d);
      }
    }
    const median = (v: number[]): number => v.sort((a, b) => a - b)[Math.floor(v.length / 2)];
    expect(inWindow.length).toBeGreaterThan(0.9 * 94 * 94);
    expect(Math.abs(median(inWindow) + 160)).toBeLessThan(5);
    expect(Math.abs(median(outside) + 100)).toBeLessThan(5);
    const record = JSON.parse(readFileSync(join(dir, 'photos', 'compare.json'), 'utf8'));
    expect(record.before.kind).toBe('photo');
    expect(record.rate_statistics_nm_per_min.median_nm).toBeCloseTo(record.statistics_nm.median_nm / 2, 6);
    expect(validate(record), JSON.stringify(validate.errors)).toBe(true);
  }, 120_000);
});
