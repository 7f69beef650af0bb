/**
 * Ctrl-C during `lamella series` (spawned compiled CLI, real mapper on worker threads): the
 * command stops its workers, leaves no partial per-frame files, exits 130, and the same command
 * run again completes the series. Frames: the first six of the invented demo series.
 * Exit status 130 = 128 + SIGINT (2): common practice for interrupted Unix programs.
 */
import { describe, expect, it, afterAll } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { copyFile, mkdir, mkdtemp, readdir, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const bin = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
const demo = fileURLToPath(new URL('../fixtures/demo/', import.meta.url));
let dir: string;

afterAll(async () => {
  if (dir) await rm(dir, { recursive: true, force: true });
});

describe('lamella series interrupted by SIGINT', () => {
  it('exits 130 with no partial files, and a rerun maps the rest', async () => {
    dir = await mkdtemp(join(tmpdir(), 'lamella-series-sigint-'));
    await mkdir(join(dir, 'in'));
    for (let i = 1; i <= 6; i++) await copyFile(join(demo, `film_00${i}.jpg`), join(dir, 'in', `film_00${i}.jpg`));
    const args = [bin, 'series', 'in', '--stack', 'soap-film', '--fps', '2', '--workers', '2', '--chunk-frames', '3', '--no-report', '--out', 'out'];
    const child = spawn(process.execPath, args, { cwd: dir });
    let stderr = '';
    const code = await new Promise<number | null>((resolve) => {
      child.stderr.on('data', (chunk: Buffer) => {
        stderr += chunk.toString();
        if (/series: [1-9]\/6 frames/.test(stderr) && !child.killed) child.kill('SIGINT');
      });
      child.on('exit', (c) => resolve(c));
    });
    expect(code).toBe(130);
    expect(stderr).toMatch(/interrupted by SIGINT; finished frames are kept/);
    const names = await readdir(join(dir, 'out', 'frames'));
    expect(names.filter((n) => n.startsWith('.') || n.endsWith('.tmp'))).toEqual([]);
    const records = names.filter((n) => n.endsWith('.json')).map((n) => n.slice(0, -5)).sort();
    const maps = names.filter((n) => n.endsWith('.thickness.npy')).map((n) => n.slice(0, -'.thickness.npy'.length)).sort();
    expect(maps).toEqual(records);
    expect(records.length).toBeGreaterThan(0);
    expect(records.length).toBeLessThan(6);
    const rerun = spawnSync(process.execPath, args, { cwd: dir, encoding: 'utf8' });
    expect(rerun.status).toBe(0);
    expect(rerun.stdout).toMatch(new RegExp(`${6 - records.length} frame\\(s\\) mapped, ${records.length} already done, 0 failed`));
    expect((await readFile(join(dir, 'out', 'series.csv'), 'utf8')).trim().split('\n')).toHaveLength(7);
  });
});
