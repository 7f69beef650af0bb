/**
 * `lamella series --spec` (issue 19): each frame's share in spec and verdict in series.csv and
 * series.json, `--fail-if-out-of-spec`. The frames are INVENTED wafers (tests/inspect-scenes.ts; a
 * deposition run whose bowl of oxide grows 15 nm a frame), so mapped thicknesses are round trips
 * through our own model; the shares are also checked against a direct count on each frame's map.
 */
import { spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeNpy } from '../src/io/decodeNpy.js';
import { DISC, discOnChuck } from './inspect-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const bin = join(root, 'bin', 'lamella.js');
const dir = mkdtempSync(join(tmpdir(), 'lamella-inspect-series-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Frame k: 420 + 15·k nm at the centre rising by 160 nm to the rim. */
const frameNm = (k: number) => (x: number, y: number): number => 420 + 15 * k + (160 * ((x - DISC.cx) ** 2 + (y - DISC.cy) ** 2)) / DISC.radiusPx ** 2;

let run: { status: number | null; stdout: string; stderr: string };
beforeAll(async () => {
  mkdirSync(join(dir, 'frames'));
  for (const k of [0, 1, 2]) writeFileSync(join(dir, 'frames', `f${k}.jpg`), (await discOnChuck(`f${k}`, frameNm(k), 1921 + k)).photo);
  run = await new Promise((resolve) => {
    const child = spawn(process.execPath, [bin, 'series', 'frames', '--stack', 'oxide-on-silicon', '--light', 'F11', '--interval', '60', '--out', 'run',
      '--spec', '400-600', '--fail-if-out-of-spec', '--workers', '1'], { cwd: dir });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}, 180_000);

describe('series --spec', () => {
  it('per-frame share and verdict in series.csv and series.json; exit 1 as one frame fails', () => {
    expect(run.status, run.stderr).toBe(1);
    expect(run.stdout).toMatch(/spec 400-600 nm: 2 of 3 frame\(s\) pass \(in-spec>=99%\), 1 fail/);
    const lines = readFileSync(join(dir, 'run', 'series.csv'), 'utf8').trim().split('\n');
    const header = lines[0].split(',');
    expect(header.slice(-2)).toEqual(['in_spec_fraction', 'verdict']);
    const rows = lines.slice(1).map((l) => l.split(','));
    expect(rows.map((r) => r.at(-1))).toEqual(['pass', 'pass', 'fail']);
    // Frame 2 (450–610 nm): out of spec where 450 + 160·r² > 600, r² > 0.9375 of the disc: 6.25 % (round trip ±1.5 points).
    expect(Math.abs(Number(rows[2].at(-2)) - 0.9375)).toBeLessThan(0.015);
    const json = JSON.parse(readFileSync(join(dir, 'run', 'series.json'), 'utf8'));
    expect(json.inspection).toMatchObject({ frames_judged: 3, frames_passed: 2, frames_failed: 1 });
    expect(json.settings.inspect).toEqual({ spec: '400-600 nm', pass_if: 'in-spec>=99%', edge_exclusion_mm: null, part: null });
    const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
    const validate = ajv.compile(JSON.parse(readFileSync(join(root, 'schemas', 'series.schema.json'), 'utf8')));
    expect(validate(json), JSON.stringify(validate.errors)).toBe(true);
    const validateFrame = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(JSON.parse(readFileSync(join(root, 'schemas', 'series-frame.schema.json'), 'utf8')));
    for (const k of [0, 1, 2]) {
      const record = JSON.parse(readFileSync(join(dir, 'run', 'frames', `f${k}.json`), 'utf8'));
      expect(validateFrame(record), JSON.stringify(validateFrame.errors)).toBe(true);
      // The share against a direct count on the frame's own map: measured in 400–600 nm over the film area.
      const thickness = decodeNpy(readFileSync(join(dir, 'run', 'frames', `f${k}.thickness.npy`)), 'npy').data as Float32Array;
      const status = decodeNpy(readFileSync(join(dir, 'run', 'frames', `f${k}.status.npy`)), 'npy').data as Uint8Array;
      let film = 0;
      let inSpec = 0;
      for (let i = 0; i < status.length; i++) {
        if (status[i] === 4 || status[i] === 6 || status[i] === 7) continue; // excluded, not film, undecided
        film++;
        if (status[i] === 0 && thickness[i] >= 400 && thickness[i] <= 600) inSpec++;
      }
      expect(record.inspection.spec.in_spec_fraction).toBeCloseTo(inSpec / film, 9);
      expect(json.inspection.per_frame[k].in_spec_fraction).toBeCloseTo(inSpec / film, 9);
    }
  });
});
