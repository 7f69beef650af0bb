/**
 * Output folders that cannot take the outputs (spawned compiled CLI): a read-only folder, a full
 * disk, and an output folder that is the input folder. Inputs are never overwritten, a failure is
 * one line naming the folder or file, and nothing partial is left behind.
 *
 * The tests run as root, which ignores permission bits, so "not writable" is made honestly with
 * a read-only bind mount, and "disk full" with a small tmpfs, each inside a private mount
 * namespace (`unshare -m`, util-linux) that vanishes with the command. Where unshare or mount is
 * not allowed (an unprivileged CI container) these cases are skipped; the same failures are
 * also injected in tests/hardening-write-failures.test.ts, which always runs.
 *
 * Photos: INVENTED soap-film wedges rendered by our own forward model (renderPhoto).
 * Exit statuses 0/2/3 are Lamella's documented contract (README "Exit statuses"; common practice
 * for command-line tools); the numbers checked here are counts of files, not physics.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sampleField, shoot, writePhoto } from './map-scenes.js';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-hardening-output-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Can this process make a private mount namespace with a tmpfs in it? */
const canMount = ((): boolean => {
  const probe = mkdtempSync(join(tmpdir(), 'lamella-mount-probe-'));
  const r = spawnSync('unshare', ['-m', 'sh', '-c', 'mount -t tmpfs -o size=64k tmpfs "$0"', probe], { encoding: 'utf8' });
  rmSync(probe, { recursive: true, force: true });
  return r.status === 0;
})();

async function photo(name: string, width: number, height: number, seed: number): Promise<void> {
  const truth = sampleField(width, height, (x, y) => 160 + 650 * (y / height) + 40 * Math.sin(x / 8));
  await writePhoto(join(dir, name), shoot(truth, width, height, { stack: 'soap-film', exposure: 6, flare: 0.01, noise: 0.003, seed }), width, height, 'png');
}

beforeAll(async () => {
  await photo('small1.png', 64, 48, 1);
  await photo('small2.png', 64, 48, 2);
  await photo('large.png', 320, 240, 3);
});

/**
 * Runs `script` (sh) in a private mount namespace; `$DIR` is the test folder and `$LAMELLA` the
 * CLI. The script prints what it needs; returns stdout and the status.
 */
function inNamespace(script: string): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync('unshare', ['-m', 'sh', '-c', script], {
    encoding: 'utf8',
    cwd: dir,
    env: { ...process.env, DIR: dir, LAMELLA: `${process.execPath} ${bin}` },
  });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** `key=value` lines and the file list printed by a namespace script. */
function parse(stdout: string): { status: number; stderr: string[]; files: string[] } {
  const lines = stdout.split('\n');
  const status = Number(lines.find((l) => l.startsWith('status='))?.slice(7));
  const files = lines.filter((l) => l.startsWith('file=')).map((l) => l.slice(5)).sort();
  const stderr = lines.filter((l) => l.startsWith('lamella: '));
  return { status, stderr, files };
}

// The outputs of one photo (without --report): maps, status, previews and the record.
const SIX = ['.confidence.npy', '.flags.png', '.json', '.map.png', '.status.npy', '.thickness.npy', '.thickness.tif'];

describe.skipIf(!canMount)('a full disk (tmpfs of 512 KiB)', () => {
  it('map: the photo that does not fit fails with one line, leaves none of its outputs, and the next photo is still mapped', () => {
    const r = inNamespace(`
      mkdir -p "$DIR/full" && mount -t tmpfs -o size=512k tmpfs "$DIR/full" || exit 99
      $LAMELLA map small1.png large.png small2.png --stack soap-film --no-report --quiet --out "$DIR/full/out" 2>&1
      echo "status=$?"
      ls -A "$DIR/full/out" | sed 's/^/file=/'
    `);
    expect(r.status, r.stderr).toBe(0);
    const run = parse(r.stdout);
    expect(run.status).toBe(3);
    expect(run.stderr).toHaveLength(2);
    expect(run.stderr[0]).toMatch(/^lamella: .*full\/out\/large\.[a-z.]+: cannot write output file \(no space left on the device, ENOSPC\)$/);
    expect(run.stderr[1]).toBe('lamella: 1 of 3 photo(s) failed: large.png');
    // small1 and small2 whole; nothing of large; no temp files; the folder's summary.csv (issue 19) of the two.
    expect(run.files).toEqual([...SIX.map((s) => `small1${s}`), ...SIX.map((s) => `small2${s}`), 'summary.csv'].sort());
  });

  it('series: frames that do not fit are reported, no .partial- folder or temp file is left', () => {
    mkdirSync(join(dir, 'frames'), { recursive: true });
    const r = inNamespace(`
      cp small1.png frames/a1.png && cp small2.png frames/a2.png && cp small1.png frames/a3.png
      mkdir -p "$DIR/fullseries" && mount -t tmpfs -o size=48k tmpfs "$DIR/fullseries" || exit 99
      $LAMELLA series frames --stack soap-film --fps 1 --workers 1 --no-report --quiet --out "$DIR/fullseries/out" 2>&1
      echo "status=$?"
      find "$DIR/fullseries/out" -mindepth 1 | sed "s|$DIR/fullseries/out/|file=|"
    `);
    expect(r.status, r.stderr).toBe(0);
    const run = parse(r.stdout);
    expect(run.status).toBe(3);
    expect(run.stderr.join('\n')).toMatch(/ENOSPC|no space left/);
    expect(run.stderr.join('\n')).not.toMatch(/^\s+at /m);
    expect(run.files.filter((f) => /\.partial-|\.tmp$/.test(f))).toEqual([]);
    // Any frame record present has its maps (a frame is whole or absent).
    const records = run.files.filter((f) => /^frames\/a\d\.json$/.test(f)).map((f) => f.slice(7, 9));
    for (const stem of records) expect(run.files).toEqual(expect.arrayContaining([`frames/${stem}.thickness.npy`, `frames/${stem}.status.npy`]));
  });
});

describe.skipIf(!canMount)('a read-only output folder (read-only bind mount)', () => {
  it.each([
    ['an existing read-only folder', 'ro', /^lamella: .*ro: output folder is not writable$/],
    ['a folder to be made inside a read-only one', 'ro/new', /^lamella: .*ro\/new: cannot create output folder \(\S*ro is not writable \(the file system is read-only, EROFS\)\)$/],
  ])('map into %s: exit 3, one line naming the folder', (_what, out, message) => {
    const r = inNamespace(`
      mkdir -p "$DIR/ro" && mount --bind "$DIR/ro" "$DIR/ro" && mount -o remount,bind,ro "$DIR/ro" || exit 99
      $LAMELLA map small1.png --stack soap-film --out "$DIR/${out}" 2>&1
      echo "status=$?"
      ls -A "$DIR/ro" | sed 's/^/file=/'
    `);
    expect(r.status, r.stderr).toBe(0);
    const run = parse(r.stdout);
    expect(run.status).toBe(3);
    expect(run.stderr).toHaveLength(1);
    expect(run.stderr[0]).toMatch(message);
    expect(run.files).toEqual([]);
  });

  it('series into a read-only folder: exit 3, one line naming the folder', () => {
    mkdirSync(join(dir, 'frames'), { recursive: true });
    const r = inNamespace(`
      cp small1.png frames/a1.png
      mkdir -p "$DIR/ro2" && mount --bind "$DIR/ro2" "$DIR/ro2" && mount -o remount,bind,ro "$DIR/ro2" || exit 99
      $LAMELLA series frames --stack soap-film --fps 1 --out "$DIR/ro2" 2>&1
      echo "status=$?"
    `);
    const run = parse(r.stdout);
    expect(run.status).toBe(3);
    expect(run.stderr).toHaveLength(1);
    expect(run.stderr[0]).toMatch(/ro2: output folder is not writable$/);
  });
});

describe('the input folder as output folder', () => {
  const digest = (file: string): string => createHash('sha256').update(readFileSync(file)).digest('hex');

  it('map photo.json --out . is refused before anything is written: the output photo.json would overwrite the input', () => {
    const sub = join(dir, 'same');
    mkdirSync(sub, { recursive: true });
    const input = join(sub, 'photo.json');
    writeFileSync(input, readFileSync(join(dir, 'small1.png')));
    const before = digest(input);
    const r = spawnSync(process.execPath, [bin, 'map', 'photo.json', '--stack', 'soap-film', '--out', '.'], { cwd: sub, encoding: 'utf8' });
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe('lamella: photo.json: output would overwrite an input file (it is the photo photo.json); choose another output folder or name');
    expect(digest(input)).toBe(before);
    expect(readdirSync(sub)).toEqual(['photo.json']);
  });

  it('map a.png a.map.png --out . is refused: a.png\'s preview would overwrite the second input', () => {
    const sub = join(dir, 'same2');
    mkdirSync(sub, { recursive: true });
    writeFileSync(join(sub, 'a.png'), readFileSync(join(dir, 'small1.png')));
    writeFileSync(join(sub, 'a.map.png'), readFileSync(join(dir, 'small2.png')));
    const before = digest(join(sub, 'a.map.png'));
    const r = spawnSync(process.execPath, [bin, 'map', 'a.png', 'a.map.png', '--stack', 'soap-film', '--out', '.'], { cwd: sub, encoding: 'utf8' });
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toMatch(/^lamella: (\.\/)?a\.map\.png: output would overwrite an input file \(it is the photo a\.map\.png\)/);
    expect(digest(join(sub, 'a.map.png'))).toBe(before);
    expect(readdirSync(sub).sort()).toEqual(['a.map.png', 'a.png']);
  });

  it('map into the photos\' own folder without a name clash works and leaves the photo unchanged', () => {
    const sub = join(dir, 'same3');
    mkdirSync(sub, { recursive: true });
    writeFileSync(join(sub, 'b.png'), readFileSync(join(dir, 'small1.png')));
    const before = digest(join(sub, 'b.png'));
    const r = spawnSync(process.execPath, [bin, 'map', 'b.png', '--stack', 'soap-film', '--no-report', '--quiet', '--out', '.'], { cwd: sub, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    expect(digest(join(sub, 'b.png'))).toBe(before);
    expect(readdirSync(sub).sort()).toEqual(['b.png', ...SIX.map((s) => `b${s}`)].sort());
  });
});

describe('single-file outputs (chart, render, calibrate --out) are never replaced by surprise', () => {
  const cli = (...args: string[]) => spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd: dir });

  it('chart --out an existing file: exit 3 naming it, file unchanged; --force replaces it', () => {
    const out = join(dir, 'kept-chart.csv');
    writeFileSync(out, 'precious\n');
    const refused = cli('chart', '--stack', 'soap-film', '--light', 'D65', '--to', '100', '--out', out);
    expect(refused.status).toBe(3);
    expect(refused.stderr.trim()).toBe(`lamella: ${out}: exists already; add --force to replace it`);
    expect(readFileSync(out, 'utf8')).toBe('precious\n');
    const forced = cli('chart', '--stack', 'soap-film', '--light', 'D65', '--to', '100', '--out', out, '--force');
    expect(forced.status, forced.stderr).toBe(0);
    expect(readFileSync(out, 'utf8')).toMatch(/^thickness_nm,/);
  });

  it('render --out an existing file: exit 3 before rendering, file unchanged; --out the input is refused even with --force', () => {
    const out = join(dir, 'kept-photo.png');
    writeFileSync(out, 'precious\n');
    const map = join(dir, 'flat.npy');
    // A 2×2 float32 .npy (NumPy format 1.0) of 300 nm.
    const header = "{'descr': '<f4', 'fortran_order': False, 'shape': (2, 2), }";
    const total = Math.ceil((10 + header.length + 1) / 64) * 64;
    const padded = header + ' '.repeat(total - 10 - header.length - 1) + '\n';
    const body = Buffer.alloc(16);
    for (let k = 0; k < 4; k++) body.writeFloatLE(300, 4 * k);
    writeFileSync(map, Buffer.concat([Buffer.from([0x93]), Buffer.from('NUMPY'), Buffer.from([1, 0, padded.length, 0]), Buffer.from(padded, 'latin1'), body]));
    const refused = cli('render', map, '--stack', 'soap-film', '--light', 'D65', '--out', out);
    expect(refused.status).toBe(3);
    expect(refused.stderr).toMatch(/kept-photo\.png: exists already; add --force to replace it/);
    expect(readFileSync(out, 'utf8')).toBe('precious\n');
    expect(cli('render', map, '--stack', 'soap-film', '--light', 'D65', '--out', out, '--force').status).toBe(0);
    const own = cli('render', map, '--stack', 'soap-film', '--light', 'D65', '--out', map, '--force');
    expect(own.status).toBe(2);
    expect(own.stderr).toMatch(/flat\.npy: output would overwrite an input file/);
    expect(readFileSync(map).length).toBe(total + 16);
  });
});
