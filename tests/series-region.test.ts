/**
 * `lamella series --region / --mask`: the film area limits every frame's statistics, as in
 * `lamella map`. Frames: the first three of the invented demo series (black film along the top,
 * the draining wedge below; see fixtures/demo/README.md). Each check is an identity of the
 * definitions (thin fraction over the film area only), not physics.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';

const bin = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
const demo = fileURLToPath(new URL('../fixtures/demo/', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'lamella-series-region-'));
for (const name of ['film_001.jpg', 'film_002.jpg', 'film_003.jpg']) copyFileSync(join(demo, name), join(dir, name));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function series(out: string, ...extra: string[]): { status: number | null; stderr: string; rows: string[][] } {
  const run = spawnSync(process.execPath, [bin, 'series', dir, '--stack', 'soap-film', '--fps', '2', '--workers', '1', '--quiet', '--no-report', '--out', join(dir, out), ...extra], { encoding: 'utf8' });
  const csv = run.status === 0 ? readFileSync(join(dir, out, 'series.csv'), 'utf8').trim().split('\n').map((l) => l.split(',')) : [];
  return { status: run.status, stderr: run.stderr, rows: csv };
}

describe('lamella series --region', () => {
  it('counts thin film only inside the region: the black film along the top is outside it', () => {
    const whole = series('whole', '--thin-below', '100');
    const below = series('below', '--thin-below', '100', '--region', '0,120,320,120');
    expect(whole.status, whole.stderr).toBe(0);
    expect(below.status, below.stderr).toBe(0);
    const col = whole.rows[0].indexOf('thin_fraction');
    for (let r = 1; r < whole.rows.length; r++) {
      const all = Number(whole.rows[r][col]);
      expect(all).toBeGreaterThan(0.008);
      // Below the black film only the odd thin swirl pixel is left.
      expect(Number(below.rows[r][col])).toBeLessThan(0.3 * all);
    }
  });

  it('a region outside the frames fails every frame with one line naming the option (exit 3)', () => {
    const run = series('outside', '--region', '0,0,400,100');
    expect(run.status).toBe(3);
    expect(run.stderr).toMatch(/--region 0,0,400,100 must lie inside the 320×240 photo/);
    expect(run.stderr).not.toMatch(/\n\s+at /);
  });

  it('a missing mask file is one line before any frame is mapped (exit 3)', () => {
    const run = series('nomask', '--mask', join(dir, 'no-such-mask.png'));
    expect(run.status).toBe(3);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr).toMatch(/no-such-mask\.png: --mask: no such image file/);
  });
});
