// Series through a camera's picture style: every frame's photo-formation fit (with the camera's
// response: tone curve and saturation) starts from the previous frame's, the frame records report
// the response, and the results do not depend on --workers. Round trip through our own forward
// model: the scene is invented (a foam lab's draining soap film under daylight, D65, filmed as
// 8-bit camera JPEGs), the picture style is ./response-scenes.ts's — a logistic S-curve and a
// BT.601 chroma boost of 1.25 (ITU-R BT.601), deliberately not the fit's own family.
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { decodeNpy } from '../src/io/decodeNpy.js';
import { EVERYDAY_STYLE, SCENE_HEIGHT, SCENE_WIDTH, asCameraJpeg, soapFilmNm, takePhoto } from './response-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-series-response-'));
const FRAMES = 4;
const truths: Float32Array[] = [];

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: dir });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(async () => {
  mkdirSync(join(dir, 'frames'));
  for (let f = 0; f < FRAMES; f++) {
    // Drains over time: 5 % thinner each frame.
    const truth = soapFilmNm(f).map((d) => d * (1 - 0.05 * f));
    truths.push(truth);
    const samples = takePhoto(truth, { stack: 'soap-film', light: 'D65', exposure: 7 - 0.1 * f, flare: 0.01, noise: 0.003, seed: 40 + f, style: EVERYDAY_STYLE });
    await asCameraJpeg(join(dir, 'frames', `frame-${f}.jpg`), samples);
  }
}, 120_000);

const args = ['frames', '--stack', 'soap-film', '--light', 'D65', '--fps', '1', '--quiet', '--no-report'];

/** Frame f's record and thickness map in a series output folder. */
const record = (out: string, f: number): Record<string, any> => JSON.parse(readFileSync(join(dir, out, 'frames', `frame-${f}.json`), 'utf8'));
const thicknessOf = (out: string, f: number): Float32Array => decodeNpy(readFileSync(join(dir, out, 'frames', `frame-${f}.thickness.npy`))).data as Float32Array;
const frameRecords = (out: string): Array<Record<string, any>> => Array.from({ length: FRAMES }, (_, f) => record(out, f));

describe('series: the camera response carries from frame to frame', () => {
  it('every frame reports the picture style it undid (saturation within ±0.05 of 1.25, an S-curve) and meets the targets', () => {
    const r = lamella('series', ...args, '--workers', '1', '--out', 'w1');
    expect(r.status, r.stderr).toBe(0);
    for (const [f, record] of frameRecords('w1').entries()) {
      // Each frame after the first started from its predecessor (map prior and photo formation).
      if (f > 0) expect(record.prior_frame).toBe(`frame-${f - 1}.jpg`);
      const response = record.fitted.response;
      expect(Math.abs(response.saturation - EVERYDAY_STYLE.saturation), `frame ${f}`).toBeLessThanOrEqual(0.05);
      expect(response.contrast, `frame ${f}`).toBeGreaterThan(0.2);
      // In-film targets of the issue: gross (> 50 nm) ≤ 1 %, p95 ≤ 15 nm, coverage ≥ 95 %.
      const map = thicknessOf('w1', f);
      const diffs: number[] = [];
      for (let i = 0; i < map.length; i++) if (Number.isFinite(map[i])) diffs.push(Math.abs(map[i] - truths[f][i]));
      diffs.sort((a, b) => a - b);
      expect(map.length).toBe(SCENE_WIDTH * SCENE_HEIGHT);
      expect(diffs.length / map.length, `frame ${f} coverage`).toBeGreaterThanOrEqual(0.95);
      expect(diffs.filter((d) => d > 50).length / map.length, `frame ${f} gross`).toBeLessThanOrEqual(0.01);
      expect(diffs[Math.floor(0.95 * (diffs.length - 1))], `frame ${f} p95`).toBeLessThanOrEqual(15);
    }
  }, 180_000);

  it('--workers 2 gives the same responses and maps', () => {
    const r = lamella('series', ...args, '--workers', '2', '--out', 'w2');
    expect(r.status, r.stderr).toBe(0);
    const one = frameRecords('w1');
    const two = frameRecords('w2');
    for (let f = 0; f < FRAMES; f++) {
      expect(two[f].fitted.response).toEqual(one[f].fitted.response);
      expect(Buffer.compare(Buffer.from(thicknessOf('w2', f).buffer), Buffer.from(thicknessOf('w1', f).buffer))).toBe(0);
    }
  }, 180_000);
});
