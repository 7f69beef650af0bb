/**
 * `lamella series` at the command line (spawns the compiled CLI, `bin/lamella.js`): usage errors
 * exit 2 and input errors exit 3 with one line naming the option or input (exit statuses: our own
 * contract, README "Exit statuses").
 */
import { describe, expect, it, beforeAll, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtemp, mkdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeImage } from '../src/io/writeImage.js';

const bin = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
let dir: string;

function lamella(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8' });
  return { status: r.status, stderr: r.stderr.trim(), stdout: r.stdout };
}

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-series-cli-'));
  await mkdir(join(dir, 'empty'));
  await mkdir(join(dir, 'shots'));
  const grey = { data: new Uint8Array(8 * 6 * 3).fill(128), width: 8, height: 6, channels: 3 as const };
  for (const name of ['a1.png', 'a2.png']) await writeImage(join(dir, 'shots', name), grey);
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('lamella series: bad options and inputs', () => {
  it.each(['3/2', '0/2', 'a/b'])('--shard %s is a usage error (exit 2) naming the option and value', (spec) => {
    const r = lamella('series', 'shots', '--stack', 'soap-film', '--fps', '2', '--shard', spec, '--out', 'out');
    expect(r.status).toBe(2);
    expect(r.stderr).toBe(`lamella: --shard must be K/N with whole numbers 1 <= K <= N, received "${spec}"`);
  });
  it('--fps 0 and --workers 1.5 are usage errors naming the option', () => {
    const fps = lamella('series', 'shots', '--stack', 'soap-film', '--fps', '0', '--out', 'out');
    expect(fps.status).toBe(2);
    expect(fps.stderr).toBe('lamella: --fps must be a number > 0, received 0');
    const workers = lamella('series', 'shots', '--stack', 'soap-film', '--fps', '2', '--workers', '1.5', '--out', 'out');
    expect(workers.status).toBe(2);
    expect(workers.stderr).toBe('lamella: --workers must be a whole number >= 1, received 1.5');
  });
  it('--fps with --interval is a usage error', () => {
    const r = lamella('series', 'shots', '--stack', 'soap-film', '--fps', '2', '--interval', '0.5', '--out', 'out');
    expect(r.status).toBe(2);
    expect(r.stderr).toBe('lamella: give --fps or --interval, not both');
  });
  it('an empty input set is an input error (exit 3) naming the inputs', () => {
    const r = lamella('series', 'empty', 'none*.jpg', '--stack', 'soap-film', '--fps', '2', '--out', 'out');
    expect(r.status).toBe(3);
    expect(r.stderr.split('\n')).toHaveLength(1);
    expect(r.stderr).toBe('lamella: empty none*.jpg: no image frames found (input folder empty holds no image files (.jpg, .png, .tif, .webp); input none*.jpg matches no file)');
  });
  it('frames without EXIF time and no --fps/--interval: usage error naming both options', () => {
    const r = lamella('series', 'shots', '--stack', 'soap-film', '--out', 'out');
    expect(r.status).toBe(2);
    expect(r.stderr).toBe('lamella: frame times: no frame has an EXIF capture time (DateTimeOriginal); give --fps or --interval');
  });
  it('an unreadable calibration file is an input error naming the file', () => {
    const r = lamella('series', 'shots', '--stack', 'soap-film', '--fps', '2', '--calibration', 'missing.json', '--out', 'out');
    expect(r.status).toBe(3);
    expect(r.stderr).toBe('lamella: missing.json: cannot read calibration file (ENOENT)');
  });
  it('an unknown stack preset is a usage error', () => {
    const r = lamella('series', 'shots', '--stack', 'bubble', '--fps', '2', '--out', 'out');
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/^lamella: --stack: unknown preset 'bubble'/);
  });
});
