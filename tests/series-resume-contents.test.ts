/**
 * Nothing stale: a series resume compares contents, not paths. An edited stack file, a replaced
 * frame photo or a changed mask makes the run map those frames again (and say how many and why);
 * a signal while series.csv, series.json and report.html are written exits 130/143 and leaves
 * those three all old or all new.
 *
 * Frames: the bundled demo series (`fixtures/demo`, INVENTED, rendered by our own forward model;
 * see fixtures/demo/README.md). The stack file is invented. Exit statuses 130/143 = 128 +
 * SIGINT(2)/SIGTERM(15) (common practice, POSIX shells).
 */
import { spawn, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { copyFileSync, cpSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const demo = new URL('../fixtures/demo/', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-series-resume-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const cli = (cwd: string, ...args: string[]) => spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8' });
const stackOf = (index: number): string => JSON.stringify({ name: 'lab film', ambient: 'air', layers: [{ material: index, thicknessNm: 'film' }], substrate: 'air' });
const SERIES = ['series', 'frames', '--stack', 'stack.json', '--workers', '1', '--out', 'out'];

function project(name: string, frames = 3): string {
  const cwd = join(dir, name);
  mkdirSync(join(cwd, 'frames'), { recursive: true });
  for (let i = 1; i <= frames; i++) copyFileSync(join(demo, `film_00${i}.jpg`), join(cwd, 'frames', `f${i}.jpg`));
  writeFileSync(join(cwd, 'stack.json'), stackOf(1.33));
  return cwd;
}

const csv = (cwd: string): string[] => readFileSync(join(cwd, 'out', 'series.csv'), 'utf8').trim().split('\n');

describe('resume by contents', () => {
  it('an edited stack file (film index 1.33 → 1.60) maps every frame again and says why', () => {
    const cwd = project('stack-edit');
    expect(cli(cwd, ...SERIES, '--fps', '2', '--quiet').status).toBe(0);
    const before = csv(cwd);
    writeFileSync(join(cwd, 'stack.json'), stackOf(1.6));
    const r = cli(cwd, ...SERIES, '--fps', '2');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toContain('lamella: 3 of 3 frame(s) to map: 3 after a stack, material, calibration, mask or light file changed');
    const after = csv(cwd);
    // Same optical path, higher index: every mean thickness is smaller (d ∝ 1/n, common practice).
    for (let i = 1; i <= 3; i++) expect(Number(after[i].split(',')[2])).toBeLessThan(Number(before[i].split(',')[2]));
  }, 120_000);

  it('a replaced frame photo maps that frame, and the later frames of its chunk, again', () => {
    const cwd = project('photo-swap');
    expect(cli(cwd, ...SERIES, '--fps', '2', '--quiet').status).toBe(0);
    const before = csv(cwd);
    copyFileSync(join(demo, 'film_020.jpg'), join(cwd, 'frames', 'f2.jpg'));
    const r = cli(cwd, ...SERIES, '--fps', '2');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toContain('lamella: 2 of 3 frame(s) to map: 1 with a changed photo file, 1 after an earlier frame of their chunk (their order prior) changed');
    const after = csv(cwd);
    expect(after[1]).toBe(before[1]);
    expect(after[2]).not.toBe(before[2]);
    // A re-run with nothing changed maps nothing and prints no such line.
    const again = cli(cwd, ...SERIES, '--fps', '2');
    expect(again.stderr).not.toContain('to map:');
    expect(csv(cwd)).toEqual(after);
  }, 120_000);

  it('a mask replaced by another with the same name maps the frames again', async () => {
    const cwd = project('mask-swap', 2);
    // Masks: white = film. Two invented 320×240 masks, the second with the left half black.
    const white = Buffer.alloc(320 * 240, 255);
    const half = Buffer.from(white);
    for (let y = 0; y < 240; y++) half.fill(0, y * 320, y * 320 + 160);
    const sharp = (await import('sharp')).default;
    const writeMask = (data: Buffer) => sharp(data, { raw: { width: 320, height: 240, channels: 1 } }).png().toFile(join(cwd, 'mask.png'));
    await writeMask(white);
    expect(cli(cwd, ...SERIES, '--fps', '2', '--mask', 'mask.png', '--quiet').status).toBe(0);
    await writeMask(half);
    const r = cli(cwd, ...SERIES, '--fps', '2', '--mask', 'mask.png');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toContain('lamella: 2 of 2 frame(s) to map: 2 after a stack, material, calibration, mask or light file changed');
  }, 120_000);

  it('a stack file called series.json in the output folder is refused before any frame (usage error naming both)', () => {
    const cwd = project('stack-is-output', 1);
    writeFileSync(join(cwd, 'series.json'), stackOf(1.33));
    // (frames/ would be the output's own per-frame folder: the photos sit in shots/.)
    mkdirSync(join(cwd, 'shots'));
    copyFileSync(join(cwd, 'frames', 'f1.jpg'), join(cwd, 'shots', 'f1.jpg'));
    rmSync(join(cwd, 'frames'), { recursive: true });
    const r = cli(cwd, 'series', 'shots', '--stack', 'series.json', '--fps', '2', '--out', '.');
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe(`lamella: ${join(cwd, 'series.json')}: output would overwrite an input file (it is the --stack file series.json); choose another output folder or name`);
    expect(readFileSync(join(cwd, 'series.json'), 'utf8')).toBe(stackOf(1.33));
    expect(readdirSync(cwd).sort()).toEqual(['series.json', 'shots', 'stack.json']);
  }, 60_000);

  it('a folder of symlinked frames is read like a folder of files; a missing input is an error before any frame', () => {
    const cwd = project('links', 2);
    mkdirSync(join(cwd, 'linked'));
    for (const name of ['f1.jpg', 'f2.jpg']) symlinkSync(join(cwd, 'frames', name), join(cwd, 'linked', name));
    const r = cli(cwd, 'series', 'linked', '--stack', 'stack.json', '--workers', '1', '--fps', '2', '--quiet', '--out', 'out');
    expect(r.status, r.stderr).toBe(0);
    expect(csv(cwd)).toHaveLength(3);
    const missing = cli(cwd, 'series', 'linked', 'no-such-folder', '--stack', 'stack.json', '--fps', '2', '--out', 'out2');
    expect(missing.status).toBe(3);
    expect(missing.stderr.trim()).toBe('lamella: no-such-folder: no such file or folder (give photos, folders of photos or a glob pattern)');
    expect(readdirSync(cwd)).not.toContain('out2');
  }, 120_000);
});

/** series.csv, series.json and report.html by hash (report time blanked), or "absent". */
function aggregate(out: string): string {
  return ['series.csv', 'series.json', 'report.html']
    .map((name) => {
      try {
        let bytes = readFileSync(join(out, name));
        if (name.endsWith('.html')) bytes = Buffer.from(bytes.toString('utf8').replace(/Generated [^<·]+/g, 'Generated (time)'));
        return createHash('sha256').update(bytes).digest('hex');
      } catch {
        return 'absent';
      }
    })
    .join(' ');
}

describe('a signal while the aggregate outputs are written', () => {
  // Old: frame rate 2/s; new: 4/s. The frames are the same (all skipped), the aggregate differs.
  let cwd: string;
  let oldSet: string;
  let newSet: string;
  beforeAll(() => {
    cwd = project('aggregate');
    expect(cli(cwd, ...SERIES, '--fps', '2', '--quiet').status).toBe(0);
    oldSet = aggregate(join(cwd, 'out'));
    cpSync(join(cwd, 'out'), join(cwd, 'reference-new'), { recursive: true });
    expect(cli(cwd, ...SERIES.slice(0, -1), 'reference-new', '--fps', '4', '--quiet').status).toBe(0);
    newSet = aggregate(join(cwd, 'reference-new'));
    expect(newSet).not.toBe(oldSet);
  }, 120_000);

  it.each([
    ['SIGINT', 0, 130],
    ['SIGINT', 150, 130],
    ['SIGTERM', 0, 143],
    ['SIGTERM', 150, 143],
  ] as const)('%s %i ms after the aggregate write starts: exit %i, the three files all old or all new', async (signal, delayMs, status) => {
    const out = join(cwd, `trial-${signal}-${delayMs}`);
    cpSync(join(cwd, 'out'), out, { recursive: true });
    const child = spawn(process.execPath, [bin, ...SERIES.slice(0, -1), out, '--fps', '4', '--quiet'], { cwd, stdio: 'ignore' });
    let seen = false;
    const poll = setInterval(() => {
      if (!seen && readdirSync(out).some((n) => n.startsWith('.lamella-staging-'))) {
        seen = true;
        setTimeout(() => child.kill(signal), delayMs);
      }
    }, 2);
    // A signal that lands while Node tears down after a finished run (its signal watchers are
    // closed by then) kills the process by the signal itself; a shell reports that as 128 + the
    // signal's number, the same status the handler gives (common practice).
    const code = await new Promise<number | null>((resolve) =>
      child.on('exit', (c, s) => resolve(c ?? (s === 'SIGINT' ? 130 : s === 'SIGTERM' ? 143 : null))),
    );
    clearInterval(poll);
    expect(seen).toBe(true);
    // On a fast machine the run may finish before a late signal: then it is simply complete.
    if (code === 0) expect(aggregate(out)).toBe(newSet);
    else expect(code).toBe(status);
    expect([oldSet, newSet]).toContain(aggregate(out));
    expect(readdirSync(out).filter((n) => n.startsWith('.'))).toEqual([]);
  }, 120_000);
});
