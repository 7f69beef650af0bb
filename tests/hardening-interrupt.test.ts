/**
 * Interrupting the batch commands (spawned compiled CLI, real mapper): SIGINT during
 * `lamella series` and SIGTERM during `lamella map` with several photos. Nothing partial may be
 * left (no `*.tmp`, no `.partial-*` folders, no photo with only some of its outputs), the exit
 * status is 128 + signal number (130 / 143; common practice for POSIX shells), and a rerun of the
 * series gives the same `series.csv` as a run that was never interrupted, byte for byte.
 *
 * Frames: an INVENTED draining soap film (a wedge thinning over time, our own scenario), rendered
 * by our own forward model (renderPhoto) and saved as PNG — a round trip through our own model,
 * used here only as realistic input, not to judge accuracy.
 */
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sampleField, shoot, writePhoto } from './map-scenes.js';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-hardening-interrupt-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const W = 160;
const H = 120;
// The photos for `map` are larger, so that one takes a second or so to map.
const PW = 320;
const PH = 240;
const FRAMES = 10;

beforeAll(async () => {
  mkdirSync(join(dir, 'frames'));
  for (let f = 0; f < FRAMES; f++) {
    // Invented drainage: the wedge thins by 4 % per frame; a gentle ripple keeps it 2-D.
    const scale = 1 - 0.04 * f;
    const truth = sampleField(W, H, (x, y) => scale * (120 + 800 * (y / H)) + 25 * Math.sin(x / 9));
    const photo = shoot(truth, W, H, { stack: 'soap-film', exposure: 6, flare: 0.01, noise: 0.003, seed: 10 + f });
    await writePhoto(join(dir, 'frames', `film_${String(f + 1).padStart(2, '0')}.png`), photo, W, H, 'png');
  }
  for (let p = 1; p <= 5; p++) {
    const truth = sampleField(PW, PH, (x, y) => 150 + 120 * p + 500 * (x / PW) + 20 * Math.cos(y / 7));
    await writePhoto(join(dir, `photo${p}.png`), shoot(truth, PW, PH, { stack: 'soap-film', exposure: 6, seed: p }), PW, PH, 'png');
  }
});

/** Every file below `root`, relative paths. */
function walk(root: string, prefix = ''): string[] {
  return readdirSync(join(root, prefix)).flatMap((name) => {
    const rel = prefix ? `${prefix}/${name}` : name;
    return statSync(join(root, rel)).isDirectory() ? [`${rel}/`, ...walk(root, rel)] : [rel];
  });
}

function leftovers(root: string): string[] {
  return walk(root).filter((p) => /\.tmp$/.test(p) || /(^|\/)\.partial-/.test(p) || /(^|\/)\.[^/]*\.\d+\.[0-9a-f]+\.tmp/.test(p));
}

/**
 * Spawns the CLI and sends `signal` once `trigger` matches the output seen so far, or (a path)
 * once that path exists: the output folder is made after the handlers are installed and before
 * the first photo is read, so its appearance means "mapping the first photo now".
 */
function interruptWhen(args: string[], trigger: RegExp | string, signal: NodeJS.Signals): Promise<{ code: number | null; stdout: string; stderr: string; sent: boolean }> {
  const child = spawn(process.execPath, [bin, ...args], { cwd: dir });
  let stdout = '';
  let stderr = '';
  let sent = false;
  const check = (): void => {
    if (!sent && (typeof trigger === 'string' ? existsSync(trigger) : trigger.test(stdout + stderr))) {
      sent = true;
      child.kill(signal);
    }
  };
  const poll = typeof trigger === 'string' ? setInterval(check, 5) : undefined;
  child.on('exit', () => clearInterval(poll));
  child.stdout.on('data', (chunk: Buffer) => {
    stdout += chunk.toString();
    check();
  });
  child.stderr.on('data', (chunk: Buffer) => {
    stderr += chunk.toString();
    check();
  });
  return new Promise((resolve) => child.on('exit', (code) => resolve({ code, stdout, stderr, sent })));
}

describe('lamella series interrupted by SIGINT, then rerun', () => {
  const common = ['series', 'frames', '--stack', 'soap-film', '--fps', '2', '--workers', '1', '--chunk-frames', '4', '--no-report'];

  it('leaves only whole frames, exits 130, and the rerun gives the uninterrupted series.csv byte for byte', async () => {
    const reference = spawnSync(process.execPath, [bin, ...common, '--out', 'ref'], { cwd: dir, encoding: 'utf8' });
    expect(reference.status, reference.stderr).toBe(0);

    const run = await interruptWhen([...common, '--out', 'int'], /series: [1-9]\/10 frames/, 'SIGINT');
    expect(run.sent).toBe(true);
    expect(run.code).toBe(130);
    expect(run.stderr).not.toMatch(/^\s+at /m);
    expect(leftovers(join(dir, 'int'))).toEqual([]);
    const names = readdirSync(join(dir, 'int', 'frames'));
    const records = names.filter((n) => n.endsWith('.json')).map((n) => n.slice(0, -'.json'.length)).sort();
    // Each finished frame has its record and both maps; nothing else is there.
    for (const suffix of ['.thickness.npy', '.status.npy']) {
      expect(names.filter((n) => n.endsWith(suffix)).map((n) => n.slice(0, -suffix.length)).sort()).toEqual(records);
    }
    expect(records.length).toBeGreaterThan(0);
    expect(records.length).toBeLessThan(FRAMES);

    const rerun = spawnSync(process.execPath, [bin, ...common, '--out', 'int'], { cwd: dir, encoding: 'utf8' });
    expect(rerun.status, rerun.stderr).toBe(0);
    expect(rerun.stdout).toMatch(new RegExp(`${FRAMES - records.length} frame\\(s\\) mapped, ${records.length} already done, 0 failed`));
    expect(leftovers(join(dir, 'int'))).toEqual([]);
    expect(readFileSync(join(dir, 'int', 'series.csv'), 'utf8')).toBe(readFileSync(join(dir, 'ref', 'series.csv'), 'utf8'));
  });
});

describe('lamella map with several photos, stopped by SIGTERM', () => {
  const SUFFIXES = ['.thickness.npy', '.thickness.tif', '.confidence.npy', '.status.npy', '.map.png', '.flags.png', '.json', '.report.html'];
  const photos = [1, 2, 3, 4, 5].map((p) => `photo${p}.png`);

  it.each([
    ['after the first photo is done', 'map-out-late', /photo1\.png: median/],
    ['while the first photo is still being mapped', 'map-out-early', join(dir, 'map-out-early')],
  ])('%s: exit 143, each photo has all of its outputs or none, no temp files', async (_when, out, trigger) => {
    const run = await interruptWhen(['map', ...photos, '--stack', 'soap-film', '--out', out], trigger, 'SIGTERM');
    expect(run.sent).toBe(true);
    expect(run.code).toBe(143);
    expect(run.stderr).not.toMatch(/^\s+at /m);
    const root = join(dir, out);
    expect(leftovers(root)).toEqual([]);
    const names = readdirSync(root);
    let complete = 0;
    for (const photo of photos) {
      const stem = photo.replace(/\.png$/, '');
      const present = SUFFIXES.filter((s) => names.includes(stem + s));
      expect([0, SUFFIXES.length], `${stem}: ${present.join(' ')}`).toContain(present.length);
      if (present.length === SUFFIXES.length) complete++;
    }
    // Photos finished before the signal are kept (whole) and one was in flight, so not all five are done.
    expect(complete).toBeLessThan(photos.length);
    if (out === 'map-out-late') expect(complete).toBeGreaterThanOrEqual(1);
    else expect(complete).toBe(0);
    // Nothing else was written (the index report comes only at the end of a full run).
    expect(names.every((n) => photos.some((p) => n.startsWith(p.replace(/\.png$/, '.'))))).toBe(true);
  });
});
