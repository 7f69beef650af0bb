/**
 * `--film-area` and `--expect` through the compiled CLI (spawned `node bin/lamella.js`, so
 * `npm run build` first): bad values are usage errors (exit 2, README "Exit statuses") in ONE line
 * naming the option, for `map` and `series`; and on a real `lamella map` run the JSON record
 * carries the settings, the `film_area` and `fit_quality` blocks and the pixel counts by status,
 * consistent with each other (definitions in src/map/types.ts and README); an anchor outside the
 * film area gives one warning naming it. The photo is an
 * INVENTED soap-film wedge rendered by our own forward model (round trip), as in map-outputs.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sampleField, shoot, writePhoto } from './map-scenes.js';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-cli-film-area-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const W = 120;
const H = 80;
const photo = join(dir, 'wedge.png');

interface Run {
  status: number | null;
  stdout: string;
  stderr: string;
}

function lamella(args: readonly string[]): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [bin, ...args], { cwd: dir });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk: Buffer) => (stdout += chunk.toString()));
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}

beforeAll(async () => {
  // Invented: a wedge 120 → 1,000 nm down the frame with a ripple across.
  const truth = sampleField(W, H, (x, y) => 120 + 880 * (y / H) * (1 + 0.05 * Math.sin(x / 9)));
  await writePhoto(photo, shoot(truth, W, H, { stack: 'soap-film', exposure: 6.5, flare: 0.01, noise: 0.002, seed: 3 }), W, H, 'png');
});

const mapArgs = ['map', 'wedge.png', '--stack', 'soap-film', '--out', 'out-bad'];
const seriesArgs = ['series', 'wedge.png', '--stack', 'soap-film', '--fps', '1', '--out', 'series-bad'];

describe('bad --film-area / --expect: exit 2, one line naming the option', () => {
  const cases: Array<[string, string[], string]> = [
    ['map --film-area mask', [...mapArgs, '--film-area', 'mask'], '--film-area'],
    ['map --film-area AUTO', [...mapArgs, '--film-area', 'AUTO'], '--film-area'],
    ['map --expect 140-80 (min above max)', [...mapArgs, '--expect', '140-80'], '--expect'],
    ['map --expect 100-100 (min = max)', [...mapArgs, '--expect', '100-100'], '--expect'],
    ['map --expect -10-50 (negative)', [...mapArgs, '--expect', '-10-50'], '--expect'],
    ['map --expect 80..140 (unparseable)', [...mapArgs, '--expect', '80..140'], '--expect'],
    ['map --expect 1e2-2e2 (not decimal)', [...mapArgs, '--expect', '1e2-2e2'], '--expect'],
    ['map --expect 100-2500 (beyond --max-thickness 2000)', [...mapArgs, '--expect', '100-2500'], '--expect'],
    ['map --expect 100-500 --max-thickness 400', [...mapArgs, '--expect', '100-500', '--max-thickness', '400'], '--expect'],
    ['series --film-area none', [...seriesArgs, '--film-area', 'none'], '--film-area'],
    ['series --expect 300-200', [...seriesArgs, '--expect', '300-200'], '--expect'],
  ];
  it.each(cases)('%s', async (_name, args, option) => {
    const run = await lamella(args);
    expect(run.status).toBe(2);
    const lines = run.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^lamella: /);
    expect(lines[0]).toContain(option);
    expect(run.stderr).not.toMatch(/\n\s+at /);
  });
});

describe('lamella map: film area in the JSON record', () => {
  it('--film-area auto: settings, film_area, fit_quality and pixel counts agree with each other', async () => {
    const run = await lamella(['map', 'wedge.png', '--stack', 'soap-film', '--film-area', 'auto', '--out', 'out-auto', '--json', '--no-report']);
    expect(run.status, run.stderr).toBe(0);
    const [record] = JSON.parse(run.stdout) as Array<Record<string, any>>;
    expect(record.settings.film_area).toBe('auto');
    expect(record.settings.expect_nm).toBeNull();
    const area = record.film_area;
    expect(Object.keys(area).sort()).toEqual(['area_mm2', 'area_px', 'area_um2', 'excluded_px', 'found', 'fraction', 'mode']);
    expect(Object.keys(area.excluded_px).sort()).toEqual(['dark_surroundings', 'glint', 'isolated', 'not_film_colour', 'outside_region', 'undecided']);
    expect(area.mode).toBe('auto');
    expect(area.area_um2).toBeNull(); // no --pixel-size
    expect(area.area_mm2).toBeNull();
    const counts = record.pixel_counts;
    expect(Object.keys(counts).sort()).toEqual(['ambiguous', 'excluded', 'not_film', 'ok', 'saturated', 'too_dark', 'too_thick', 'undecided']);
    const total = Object.values(counts as Record<string, number>).reduce((a, b) => a + b, 0);
    expect(total).toBe(W * H);
    expect(area.area_px).toBe(W * H - counts.excluded - counts.not_film - counts.undecided);
    const excludedSum = Object.values(area.excluded_px as Record<string, number>).reduce((a, b) => a + b, 0);
    expect(area.area_px + excludedSum).toBe(W * H);
    expect(area.fraction).toBeCloseTo(area.area_px / (W * H), 12);
    expect(record.statistics.film_area_px).toBe(area.area_px);
    // A film from edge to edge is found (how much of it is the detection's business, tested with it).
    expect(area.found).toBe(true);
    if (record.fit_quality !== null) {
      expect(Object.keys(record.fit_quality).sort()).toEqual(['median_delta_e2000', 'p95_delta_e2000', 'unmatched_fraction', 'verdict']);
      expect(['good', 'fair', 'poor']).toContain(record.fit_quality.verdict);
    }
  });

  it('--film-area whole --expect --region --pixel-size: the region is the film area, in px, µm² and mm²', async () => {
    const run = await lamella([
      'map', 'wedge.png', '--stack', 'soap-film', '--out', 'out-whole', '--json', '--no-report',
      '--film-area', 'whole', '--expect', '100-1100', '--region', '10,10,100,60', '--pixel-size', '4', '--anchor', '2,3=300',
    ]);
    expect(run.status, run.stderr).toBe(0);
    const [record] = JSON.parse(run.stdout) as Array<Record<string, any>>;
    expect(record.settings.film_area).toBe('whole');
    expect(record.settings.expect_nm).toEqual([100, 1100]);
    const area = record.film_area;
    expect(area.mode).toBe('whole');
    expect(area.area_px).toBe(6000);
    expect(area.excluded_px.outside_region).toBe(W * H - 6000);
    expect(area.excluded_px.undecided + area.excluded_px.not_film_colour + area.excluded_px.dark_surroundings).toBe(0);
    expect(record.pixel_counts.not_film).toBe(0);
    expect(record.pixel_counts.undecided).toBe(0);
    // 4 µm pixels: 16 µm² each.
    expect(area.area_um2).toBeCloseTo(6000 * 16, 6);
    expect(area.area_mm2).toBeCloseTo(0.096, 12);
    expect(area.fraction).toBeCloseTo(6000 / (W * H), 12);
    // The anchor lies outside the region (so outside the film area): one warning names it, on
    // stderr and in the record (the wording is the mapper's).
    expect(record.warnings.filter((w: string) => w.includes('--anchor 2,3=300'))).toHaveLength(1);
    expect(run.stderr).toContain('--anchor 2,3=300');
  });
});
