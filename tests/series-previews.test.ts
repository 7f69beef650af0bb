// Series previews in one colour range (so a colour change between frames is a thickness change):
// the series' own range (lowest 5th to highest 95th percentile of its frames, rounded), or
// `--range MIN-MAX`. Runs on the first frames of the bundled demo (invented data, see
// fixtures/demo/README.md). Checks of our own rules; the percentiles come from each frame's record.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-previews-'));
const demo = join(root, 'fixtures', 'demo');
const frames = ['film_001', 'film_002', 'film_003', 'film_004'];

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: dir });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}
const record = (out: string, stem: string) => JSON.parse(readFileSync(join(dir, out, 'frames', `${stem}.json`), 'utf8'));
const args = [demo, '--stack', 'soap-film', '--light', 'D65', '--fps', '2', '--end', '1.5', '--previews', '--no-report', '--quiet', '--workers', '2', '--chunk-frames', '2'];

describe('series previews in one colour range', () => {
  it('by default the series\' own range: every preview drawn in it, series.json names it; a rerun redraws nothing', () => {
    const r = lamella('series', ...args, '--out', 'own');
    expect(r.status, r.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(join(dir, 'own', 'series.json'), 'utf8'));
    const range = summary.settings.preview_range_nm as [number, number];
    const p05 = Math.min(...frames.map((f) => record('own', f).stats.p05_nm));
    const p95 = Math.max(...frames.map((f) => record('own', f).stats.p95_nm));
    expect(range[0]).toBeLessThanOrEqual(p05);
    expect(range[1]).toBeGreaterThanOrEqual(p95);
    for (const f of frames) expect(record('own', f).preview_range_nm).toEqual(range);
    const before = frames.map((f) => statSync(join(dir, 'own', 'frames', `${f}.map.png`)).mtimeMs);
    expect(lamella('series', ...args, '--out', 'own').status).toBe(0);
    expect(frames.map((f) => statSync(join(dir, 'own', 'frames', `${f}.map.png`)).mtimeMs)).toEqual(before);
  }, 180_000);

  it('--range MIN-MAX fixes it (previews drawn in it, series.json says so); a bad range is exit 2', () => {
    const r = lamella('series', ...args, '--range', '0-1200', '--out', 'own');
    expect(r.status, r.stderr).toBe(0);
    for (const f of frames) expect(record('own', f).preview_range_nm).toEqual([0, 1200]);
    expect(JSON.parse(readFileSync(join(dir, 'own', 'series.json'), 'utf8')).settings.preview_range_source).toBe('--range');
    const bad = lamella('series', ...args, '--range', '900-100', '--out', 'bad');
    expect(bad.status).toBe(2);
    expect(bad.stderr).toContain('--range MIN must be below MAX');
  }, 180_000);
});
