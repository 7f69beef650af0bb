/**
 * Nothing lost: inputs are never overwritten, however the output folder is reached, and a re-run
 * that is stopped (Ctrl-C, SIGTERM, SIGKILL, a full disk) leaves the whole old set of outputs or
 * the whole new one, never a mix and never nothing.
 *
 * Photos: the bundled demo frames (`fixtures/demo`, INVENTED: rendered by our own forward model,
 * see fixtures/demo/README.md). Stack and calibration files here are invented too. Exit statuses:
 * 2 usage, 130/143 = 128 + SIGINT(2)/SIGTERM(15) (common practice, POSIX shells).
 */
import { spawn, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { copyFileSync, cpSync, linkSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const demo = new URL('../fixtures/demo/', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-hardening-results-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const cli = (cwd: string, ...args: string[]) => spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8' });
const digest = (file: string): string => createHash('sha256').update(readFileSync(file)).digest('hex');

/** A stack file of our own: a free water-like film of index 1.33 in air (invented). */
const STACK = JSON.stringify({ name: 'lab film', ambient: 'air', layers: [{ material: 1.33, thicknessNm: 'film' }], substrate: 'air' });
/** A calibration record in the format `lamella calibrate` writes (invented values). */
const CALIBRATION = JSON.stringify({
  lamella_calibration: 1,
  fitted: { exposure: 7, whiteBalance: [1, 1, 1], flare: [0, 0, 0] },
  applies_to: { stack: 'soap-film', light: 'D65', angle_deg: 0 },
});

function folder(name: string): string {
  const path = join(dir, name);
  mkdirSync(path, { recursive: true });
  copyFileSync(join(demo, 'film_001.jpg'), join(path, 'p.jpg'));
  return path;
}

describe('inputs are never overwritten (compared by device and inode after following links)', () => {
  it('--stack p.json --out . : usage error naming both, the stack file unchanged, nothing written', () => {
    const cwd = folder('stack-clash');
    writeFileSync(join(cwd, 'p.json'), STACK);
    const r = cli(cwd, 'map', 'p.jpg', '--stack', 'p.json', '--out', '.');
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe('lamella: p.json: output would overwrite an input file (it is the --stack file p.json); choose another output folder or name');
    expect(readFileSync(join(cwd, 'p.json'), 'utf8')).toBe(STACK);
    expect(readdirSync(cwd).sort()).toEqual(['p.jpg', 'p.json']);
  });

  it('--calibration p.json --out . : usage error, the calibration unchanged', () => {
    const cwd = folder('calibration-clash');
    writeFileSync(join(cwd, 'p.json'), CALIBRATION);
    const r = cli(cwd, 'map', 'p.jpg', '--stack', 'soap-film', '--calibration', 'p.json', '--out', '.');
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe('lamella: p.json: output would overwrite an input file (it is the --calibration file p.json); choose another output folder or name');
    expect(readFileSync(join(cwd, 'p.json'), 'utf8')).toBe(CALIBRATION);
  });

  it('a material file named by the stack file is an input too', () => {
    const cwd = folder('material-clash');
    writeFileSync(join(cwd, 'p.csv'), 'wavelength_nm,n,k\n300,1.33,0\n900,1.33,0\n');
    writeFileSync(join(cwd, 'stack.json'), JSON.stringify({ name: 'lab film', ambient: 'air', layers: [{ material: 'p.csv', thicknessNm: 'film' }], substrate: 'air' }));
    // The material file cannot clash by suffix, but a hard link named like an output can.
    linkSync(join(cwd, 'p.csv'), join(cwd, 'p.thickness.tif'));
    const r = cli(cwd, 'map', 'p.jpg', '--stack', 'stack.json', '--out', '.');
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('p.thickness.tif: output would overwrite an input file (it is the same file as the material file');
    expect(readFileSync(join(cwd, 'p.csv'), 'utf8')).toMatch(/^wavelength_nm/);
  });

  it('--out through a symlink to the photos\' folder: a mask named like an output is refused', () => {
    const cwd = folder('link-mask');
    mkdirSync(join(cwd, 'photos'));
    copyFileSync(join(cwd, 'p.jpg'), join(cwd, 'photos', 'p.jpg'));
    // A mask that happens to be called p.map.png (any 320×240 picture will do as a mask file).
    copyFileSync(join(demo, 'film_002.jpg'), join(cwd, 'photos', 'p.map.png'));
    const before = digest(join(cwd, 'photos', 'p.map.png'));
    symlinkSync('photos', join(cwd, 'outlink'));
    const r = cli(cwd, 'map', 'photos/p.jpg', '--mask', 'photos/p.map.png', '--stack', 'soap-film', '--out', 'outlink');
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe('lamella: outlink/p.map.png: output would overwrite an input file (it is the same file as the --mask photos/p.map.png); choose another output folder or name');
    expect(digest(join(cwd, 'photos', 'p.map.png'))).toBe(before);
    expect(readdirSync(join(cwd, 'photos')).sort()).toEqual(['p.jpg', 'p.map.png']);
  });

  it('--out through a symlink: a photo named like another photo\'s output is refused', () => {
    const cwd = folder('link-photo');
    mkdirSync(join(cwd, 'photos'));
    copyFileSync(join(cwd, 'p.jpg'), join(cwd, 'photos', 'p.jpg'));
    copyFileSync(join(demo, 'film_002.jpg'), join(cwd, 'photos', 'p.flags.png'));
    symlinkSync(join(cwd, 'photos'), join(cwd, 'outlink'));
    const r = cli(cwd, 'map', 'photos/p.flags.png', 'photos/p.jpg', '--stack', 'soap-film', '--out', 'outlink');
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toMatch(/^lamella: outlink\/p\.flags\.png: output would overwrite an input file \(it is the same file as the photo photos\/p\.flags\.png\)/);
  });

  it('chart: --out the stack file is refused even with --force', () => {
    const cwd = folder('single-file');
    writeFileSync(join(cwd, 'stack.json'), STACK);
    const chartJson = cli(cwd, 'chart', '--stack', 'stack.json', '--light', 'D65', '--to', '100', '--format', 'csv', '--out', 'stack.json', '--force');
    expect(chartJson.status).toBe(2);
    expect(chartJson.stderr).toContain('stack.json: output would overwrite an input file (it is the --stack file stack.json)');
    expect(readFileSync(join(cwd, 'stack.json'), 'utf8')).toBe(STACK);
  });
});

/** The outputs of one map run, by name, with report times blanked (they differ run to run). */
function outputSet(path: string): Record<string, string> {
  const set: Record<string, string> = {};
  for (const name of readdirSync(path)) {
    if (name.startsWith('.') || name === 'p.jpg') continue;
    let bytes = readFileSync(join(path, name));
    if (name.endsWith('.html')) bytes = Buffer.from(bytes.toString('utf8').replace(/Generated [^<·]+/g, 'Generated (time)'));
    set[name] = createHash('sha256').update(bytes).digest('hex');
  }
  return set;
}

function hidden(path: string): string[] {
  return readdirSync(path).filter((n) => n.startsWith('.'));
}

const OLD = ['--stack', 'soap-film'];
const NEW = ['--stack', 'soap-film', '--film-index', '1.40'];

describe('a stopped re-run leaves the whole old set or the whole new one', () => {
  let oldSet: Record<string, string>;
  let newSet: Record<string, string>;
  beforeAll(() => {
    const a = folder('reference-old');
    expect(cli(a, 'map', 'p.jpg', ...OLD, '--quiet', '--out', '.').status).toBe(0);
    oldSet = outputSet(a);
    const b = folder('reference-new');
    expect(cli(b, 'map', 'p.jpg', ...NEW, '--quiet', '--out', '.').status).toBe(0);
    newSet = outputSet(b);
    expect(Object.keys(oldSet).sort()).toEqual(['p.confidence.npy', 'p.flags.png', 'p.json', 'p.map.png', 'p.report.html', 'p.status.npy', 'p.thickness.npy', 'p.thickness.tif', 'report.html']);
    expect(newSet['p.json']).not.toBe(oldSet['p.json']);
  }, 60_000);

  /** Starts the new run over a copy of the old set; sends `signal` `delayMs` after the run starts writing. */
  async function stopped(name: string, signal: NodeJS.Signals, delayMs: number): Promise<{ code: number | null; signal: string | null; sawWriting: boolean; path: string }> {
    const path = join(dir, name);
    cpSync(join(dir, 'reference-old'), path, { recursive: true });
    const child = spawn(process.execPath, [bin, 'map', 'p.jpg', ...NEW, '--quiet', '--out', '.'], { cwd: path, stdio: 'ignore' });
    let sawWriting = false;
    const poll = setInterval(() => {
      if (sawWriting) return;
      if (readdirSync(path).some((n) => n.startsWith('.lamella-staging-'))) {
        sawWriting = true;
        setTimeout(() => child.kill(signal), delayMs);
      }
    }, 2);
    const [code, sig] = (await new Promise((resolve) => child.on('exit', (c, s) => resolve([c, s])))) as [number | null, string | null];
    clearInterval(poll);
    return { code, signal: sig, sawWriting, path };
  }

  const outcomes: string[] = [];
  const trials: Array<[NodeJS.Signals, number]> = [];
  for (const signal of ['SIGINT', 'SIGTERM', 'SIGKILL'] as const) for (const delayMs of [0, 80]) trials.push([signal, delayMs]);

  it.each(trials)('%s %i ms into the write', async (signal, delayMs) => {
    const run = await stopped(`stopped-${signal}-${delayMs}`, signal, delayMs);
    expect(run.sawWriting).toBe(true);
    const now = outputSet(run.path);
    const whole = JSON.stringify(now) === JSON.stringify(oldSet) ? 'old' : JSON.stringify(now) === JSON.stringify(newSet) ? 'new' : 'mixed';
    expect(whole, JSON.stringify({ now, run: { code: run.code, signal: run.signal } })).not.toBe('mixed');
    outcomes.push(whole);
    if (whole === 'old') {
      // Stopped before the swap: the run says so with the signal's status.
      if (signal === 'SIGKILL') expect(run.signal).toBe('SIGKILL');
      else expect(run.code).toBe(signal === 'SIGINT' ? 130 : 143);
    }
    if (signal !== 'SIGKILL') expect(hidden(run.path)).toEqual([]);
    // The next run in the folder clears anything a SIGKILL left and completes the new set.
    expect(cli(run.path, 'map', 'p.jpg', ...NEW, '--quiet', '--out', '.').status).toBe(0);
    expect(hidden(run.path)).toEqual([]);
    expect(outputSet(run.path)).toEqual(newSet);
  }, 60_000);

  it('the stops above did land during the write: some left the old set', () => {
    expect(outcomes).toHaveLength(trials.length);
    expect(outcomes).toContain('old');
  });
});

/** Can this process make a private mount namespace with a tmpfs in it? */
const canMount = ((): boolean => {
  const probe = mkdtempSync(join(tmpdir(), 'lamella-mount-probe-'));
  const r = spawnSync('unshare', ['-m', 'sh', '-c', 'mount -t tmpfs -o size=64k tmpfs "$0"', probe], { encoding: 'utf8' });
  rmSync(probe, { recursive: true, force: true });
  return r.status === 0;
})();

describe.skipIf(!canMount)('a re-run on a full disk (tmpfs that holds one set, not two)', () => {
  it('fails with one line and keeps the whole old set; no staging folder is left', () => {
    const cwd = folder('full');
    const r = spawnSync('unshare', ['-m', 'sh', '-c', `
      mkdir -p out && mount -t tmpfs -o size=1600k tmpfs out || exit 99
      $LAMELLA map p.jpg ${OLD.join(' ')} --no-report --quiet --out out || exit 98
      sha256sum out/* > before.txt
      $LAMELLA map p.jpg ${NEW.join(' ')} --no-report --quiet --out out 2>&1
      echo "status=$?"
      sha256sum out/* > after.txt
      ls -A out | sed 's/^/file=/'
    `], { cwd, encoding: 'utf8', env: { ...process.env, LAMELLA: `${process.execPath} ${bin}` } });
    expect(r.status, r.stderr + r.stdout).toBe(0);
    const lines = r.stdout.split('\n');
    expect(lines.find((l) => l.startsWith('status='))).toBe('status=3');
    expect(lines.filter((l) => l.startsWith('lamella: '))[0]).toMatch(/^lamella: .*out\/p\.[a-z.]+: cannot write output file \(no space left on the device, ENOSPC\)$/);
    expect(readFileSync(join(cwd, 'after.txt'), 'utf8')).toBe(readFileSync(join(cwd, 'before.txt'), 'utf8'));
    expect(lines.filter((l) => l.startsWith('file=.'))).toEqual([]);
    expect(lines.filter((l) => l.startsWith('file='))).toHaveLength(7); // the seven outputs of one photo without the report
  });
});
