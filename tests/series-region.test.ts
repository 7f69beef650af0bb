/**
 * `lamella series --region / --mask`: the film area limits every frame's statistics, as in
 * `lamella map`. Frames: the first three of the invented demo series (black film along the top,
 * the draining wedge below; see fixtures/demo/README.md). Each check is an identity of the
 * definitions (thin fraction over the film area only), not physics.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
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

  it('a region outside the frames is one usage error before any frame is mapped (exit 2)', () => {
    const run = series('outside', '--region', '0,0,400,100');
    expect(run.status).toBe(2);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr).toMatch(/--region 0,0,400,100 must lie inside the 320×240 frames/);
    expect(existsSync(join(dir, 'outside', 'frames'))).toBe(false);
  });

  it('an anchor outside the frames is one usage error before any frame is mapped (exit 2)', () => {
    const run = series('anchor', '--anchor', '330,10=500');
    expect(run.status).toBe(2);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr).toMatch(/--anchor 330,10 lies outside the 320×240 frames/);
  });

  it('film-area options are parsed as by lamella map (one parser): bad values are one usage error naming the option', () => {
    for (const [option, value, message] of [
      ['--thin-below', '-5', '--thin-below must be a number of nm >= 0, received -5'],
      ['--pixel-size', '0', '--pixel-size must be a number of micrometres > 0 and at most 1e6 (1 m), received 0'],
      ['--max-thickness', '30000', '--max-thickness must be a number of nm from 10 to 20000, received 30000'],
    ]) {
      const run = series(`bad${option}`, option, value);
      expect(run.status).toBe(2);
      expect(run.stderr.trim()).toBe(`lamella: ${message}`);
    }
  });

  it('a mask of another size is one line naming it before any frame is mapped (exit 3)', async () => {
    // Kept outside the frames' folder, which the series reads whole.
    const mask = join(dir, 'smallmask-input.png.d', 'small-mask.png');
    mkdirSync(dirname(mask), { recursive: true });
    await sharp({ create: { width: 100, height: 80, channels: 3, background: '#ffffff' } }).png().toFile(mask);
    const run = series('smallmask', '--mask', mask);
    expect(run.status).toBe(3);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr).toMatch(/small-mask\.png: mask is 100×80 but the photo is 320×240/);
    expect(existsSync(join(dir, 'smallmask', 'frames'))).toBe(false);
  });

  it('a missing mask file is one line before any frame is mapped (exit 3)', () => {
    const run = series('nomask', '--mask', join(dir, 'no-such-mask.png'));
    expect(run.status).toBe(3);
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
    expect(run.stderr).toMatch(/no-such-mask\.png: --mask: no such image file/);
  });
});
