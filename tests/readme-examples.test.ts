// The README's library examples are the files in examples/: each must appear in the README word
// for word and run as it stands, importing from the package root ('lamella', resolved by Node's
// package self-reference through package.json "exports"). What the examples print is checked for
// its form and, for the map, against the demo's own truth (fixtures/demo/truth.csv: an invented
// draining film rendered with our own forward model, so a round trip).
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = new URL('..', import.meta.url).pathname;
const readme = readFileSync(join(root, 'README.md'), 'utf8');

function runExample(name: string): { status: number | null; stdout: string; stderr: string } {
  return spawnSync(process.execPath, [join(root, 'examples', name)], { encoding: 'utf8', cwd: root });
}

describe('README library examples (examples/*.mjs)', () => {
  for (const name of ['map-in-memory.mjs', 'oxide-chart.mjs', 'series-with-progress.mjs']) {
    it(`${name} is in the README word for word, as a js block`, () => {
      expect(readme).toContain('```js\n' + readFileSync(join(root, 'examples', name), 'utf8') + '```');
    });
  }

  it('map-in-memory.mjs maps the demo frame from its bytes: a median near the frame\'s true mean, thin regions counted', () => {
    const r = runExample('map-in-memory.mjs');
    expect(r.status, r.stderr).toBe(0);
    const match = /^median (\d+\.\d) nm, coverage (\d+\.\d) %, (\d+) thin region\(s\)$/.exec(r.stdout.trim());
    expect(match, r.stdout).not.toBeNull();
    const truth = readFileSync(join(root, 'fixtures', 'demo', 'truth.csv'), 'utf8').trim().split('\n');
    const header = truth[0].split(',');
    const row = truth.find((line) => line.startsWith('film_008'))!.split(',');
    const trueMean = Number(row[header.findIndex((h) => /mean/.test(h))]);
    // The frame is a wedge: its median lies within a tenth of its mean (our own scene's shape).
    expect(Math.abs(Number(match![1]) - trueMean)).toBeLessThan(0.1 * trueMean);
    expect(Number(match![2])).toBeGreaterThan(80);
  }, 120_000);

  it('oxide-chart.mjs prints six rows, 0–500 nm, orders that never go down', () => {
    const r = runExample('oxide-chart.mjs');
    expect(r.status, r.stderr).toBe(0);
    const rows = r.stdout.trim().split('\n').map((line) => /^(\d+) nm {2}order (\d+) {2}sRGB (\d+) (\d+) (\d+)$/.exec(line));
    expect(rows).toHaveLength(6);
    expect(rows.every(Boolean)).toBe(true);
    expect(rows.map((m) => Number(m![1]))).toEqual([0, 100, 200, 300, 400, 500]);
    const orders = rows.map((m) => Number(m![2]));
    for (let i = 1; i < orders.length; i++) expect(orders[i]).toBeGreaterThanOrEqual(orders[i - 1]);
  }, 60_000);

  it('series-with-progress.mjs maps six frames with progress and writes the aggregate', () => {
    const r = runExample('series-with-progress.mjs');
    expect(r.status, r.stderr).toBe(0);
    const lines = r.stdout.trim().split('\n');
    expect(lines.slice(0, 6)).toEqual([1, 2, 3, 4, 5, 6].map((k) => `frame ${k}/6 (0 failed)`));
    const last = /^interrupted: false; outputs: (.+)$/.exec(lines[6]);
    expect(last, r.stdout).not.toBeNull();
    for (const file of last![1].split(', ')) expect(existsSync(file), file).toBe(true);
  }, 180_000);
});
