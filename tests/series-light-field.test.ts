// Series under uneven light: each frame starts its light field from the previous frame's (like the
// exposure), the frame records keep the field exactly, and the results do not depend on --workers
// or on an interrupted and resumed run. Round trip through our own forward model (lamella render):
// the scene is invented — a foam lab's draining soap film lit by a diffuse panel from one side
// (35 % fall-off along a tilted direction) through a lens with cos⁴-form vignetting (cos⁴ law of
// illumination, common practice; 25 % at the corners), recorded as linear 16-bit TIFF frames.
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { encodeNpy } from '../src/io/encodeNpy.js';
import { encodeTiff } from '../src/io/encodeImage.js';
import { readPhoto } from '../src/io/readPhoto.js';
import { unevenGainAt } from './uneven-light.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-series-field-'));
const W = 200;
const H = 150;
const FRAMES = 4;
const truths: Float32Array[] = [];

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: dir });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

function gainAt(x: number, y: number): number {
  return unevenGainAt(x, y, W, H);
}

beforeAll(async () => {
  mkdirSync(join(dir, 'frames'));
  for (let f = 0; f < FRAMES; f++) {
    // Drains over time: the wedge thins by 6 % a frame, the ripples drift down.
    const truth = new Float32Array(W * H);
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
      truth[y * W + x] = (80 + 950 * Math.pow(y / (H - 1), 1.2)) * (1 - 0.06 * f) + 25 * Math.sin(x / 17 + (y - 4 * f) / 37);
    }
    truths.push(truth);
    writeFileSync(join(dir, `t${f}.npy`), encodeNpy(truth, [H, W]));
    const r = lamella('render', `t${f}.npy`, '--stack', 'soap-film', '--light', 'D65', '--camera', 'linear', '--exposure', String(0.9 - 0.01 * f), '--noise', '0.002', '--out', `t${f}.tif`);
    expect(r.status, r.stderr).toBe(0);
    const even = await readPhoto(join(dir, `t${f}.tif`));
    const lit = new Uint16Array(W * H * 3);
    for (let i = 0; i < W * H; i++) {
      const g = gainAt(i % W, Math.floor(i / W));
      for (let c = 0; c < 3; c++) lit[i * 3 + c] = Math.round(Math.min(1, even.rgb[i * 3 + c] * g + 0.003) * 65535);
    }
    writeFileSync(join(dir, 'frames', `frame-${f}.tif`), await encodeTiff({ data: lit, width: W, height: H, channels: 3 }));
  }
}, 120_000);

const args = ['frames', '--stack', 'soap-film', '--light', 'D65', '--camera', 'linear', '--film-area', 'whole', '--fps', '1', '--quiet', '--no-report'];

function frameRecords(out: string): Array<Record<string, any>> {
  return Array.from({ length: FRAMES }, (_, f) => JSON.parse(readFileSync(join(dir, out, 'frames', `frame-${f}.json`), 'utf8')));
}

function thicknessOf(out: string, f: number): Float32Array {
  const buf = readFileSync(join(dir, out, 'frames', `frame-${f}.thickness.npy`));
  const headerLength = buf.readUInt16LE(8);
  return new Float32Array(buf.buffer.slice(buf.byteOffset + 10 + headerLength, buf.byteOffset + buf.length));
}

describe('series: the light field carries from frame to frame', () => {
  it('every frame is mapped over a fitted field; later frames start from the previous one and need fewer rounds; targets met', () => {
    const r = lamella('series', ...args, '--workers', '1', '--out', 'w1');
    expect(r.status, r.stderr).toBe(0);
    const records = frameRecords('w1');
    for (const record of records) {
      expect(record.exposure_field.source).toBe('photo');
      expect(record.exposure_field.gain_max / record.exposure_field.gain_min).toBeGreaterThan(1.3);
      expect(record.light_evenness.gain_max / record.light_evenness.gain_min).toBeLessThan(1.05);
    }
    // The first frame starts cold; the others from their predecessor's field.
    const later = records.slice(1).map((rec) => rec.exposure_field.rounds);
    expect(Math.max(...later)).toBeLessThan(records[0].exposure_field.rounds);
    // In-film targets of the issue on every frame: gross (> 50 nm) ≤ 1 %, p95 ≤ 15 nm, coverage ≥ 95 %.
    for (let f = 0; f < FRAMES; f++) {
      const map = thicknessOf('w1', f);
      const diffs: number[] = [];
      for (let i = 0; i < map.length; i++) if (Number.isFinite(map[i])) diffs.push(Math.abs(map[i] - truths[f][i]));
      diffs.sort((a, b) => a - b);
      expect(diffs.length / map.length).toBeGreaterThanOrEqual(0.95);
      expect(diffs.filter((d) => d > 50).length / map.length).toBeLessThanOrEqual(0.01);
      expect(diffs[Math.floor(0.95 * (diffs.length - 1))]).toBeLessThanOrEqual(15);
    }
  }, 180_000);

  it('--workers 2 gives the same maps and fields; a resumed run too', () => {
    const r = lamella('series', ...args, '--workers', '2', '--out', 'w2');
    expect(r.status, r.stderr).toBe(0);
    const one = frameRecords('w1');
    const two = frameRecords('w2');
    for (let f = 0; f < FRAMES; f++) {
      expect(two[f].exposure_field).toEqual(one[f].exposure_field);
      expect(Buffer.compare(Buffer.from(thicknessOf('w2', f).buffer), Buffer.from(thicknessOf('w1', f).buffer))).toBe(0);
    }
    // Interrupted after frame 1: frames 2 and 3 are mapped again, frame 2 starting from frame 1's stored field.
    for (const name of readdirSync(join(dir, 'w2', 'frames'))) if (/^frame-[23]\./.test(name)) rmSync(join(dir, 'w2', 'frames', name));
    const resumed = lamella('series', ...args, '--workers', '1', '--out', 'w2');
    expect(resumed.status, resumed.stderr).toBe(0);
    const again = frameRecords('w2');
    for (let f = 2; f < FRAMES; f++) {
      expect(again[f].exposure_field).toEqual(one[f].exposure_field);
      expect(Buffer.compare(Buffer.from(thicknessOf('w2', f).buffer), Buffer.from(thicknessOf('w1', f).buffer))).toBe(0);
    }
  }, 240_000);
});
