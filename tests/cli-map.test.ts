/**
 * `lamella map` on bad input, end to end (spawns bin/lamella.js on dist/; the test script builds
 * dist/ first). Each failure must be ONE line on stderr naming the file or option, with the
 * documented exit status (src/cli/errors.ts: 2 usage, 3 input) and no stack trace; a bad photo
 * among good ones must not stop the others. The good photos are invented soap-film wedges
 * rendered by our own forward model (not measurements).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sampleField, shoot, writePhoto } from './map-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-cli-map-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const W = 64;
const H = 48;
const good = join(dir, 'good.jpg');
const good2 = join(dir, 'good2.png');

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), 'map', ...args], { encoding: 'utf8', cwd: dir });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

/** stderr is exactly one line starting `lamella:` with no stack trace. */
function expectOneLine(stderr: string): string {
  const lines = stderr.split('\n').filter((l) => l !== '');
  expect(lines, stderr).toHaveLength(1);
  expect(lines[0].startsWith('lamella: ')).toBe(true);
  expect(stderr).not.toMatch(/^\s+at /m);
  return lines[0];
}

beforeAll(async () => {
  const truth = sampleField(W, H, (x, y) => 150 + 900 * (y / H) + 30 * Math.sin(x / 7));
  const data = shoot(truth, W, H, { stack: 'soap-film', exposure: 6, flare: 0.01, noise: 0.003 });
  await writePhoto(good, data, W, H, 'jpeg', 90);
  await writePhoto(good2, data, W, H, 'png');
  writeFileSync(join(dir, 'empty.jpg'), Buffer.alloc(0));
  const jpeg = readFileSync(good);
  writeFileSync(join(dir, 'truncated.jpg'), jpeg.subarray(0, Math.floor(jpeg.length / 3)));
  writeFileSync(join(dir, 'notes.jpg'), 'thickness notes, not a photo\n');
  writeFileSync(join(dir, 'a-file'), 'x');
  // Grey-scale photo (one channel): the wedge under a 546 nm line light, several fringes, saved grey.
  const fringes = shoot(truth, W, H, { stack: 'soap-film', light: 'line:546', exposure: 4, flare: 0.01, noise: 0.002 });
  await sharp(Buffer.from(fringes), { raw: { width: W, height: H, channels: 3 } }).greyscale().png().toFile(join(dir, 'grey.png'));
});

describe('lamella map: bad input gives one line and the right exit status', () => {
  it.each([
    ['missing file', 'nosuch.jpg', /nosuch\.jpg.*not found/],
    ['empty file', 'empty.jpg', /empty\.jpg.*empty/],
    ['truncated JPEG', 'truncated.jpg', /truncated\.jpg.*(truncated|corrupt)/],
    ['text file named .jpg', 'notes.jpg', /notes\.jpg.*not an image/],
    ['a folder', 'sub', /sub.*folder/],
  ])('%s → exit 3 naming the file', (_label, file, message) => {
    mkdirSync(join(dir, 'sub'), { recursive: true });
    const r = lamella(file, '--stack', 'soap-film', '--out', 'out-bad');
    expect(r.status).toBe(3);
    const lines = r.stderr.split('\n').filter((l) => l !== '');
    // The per-photo line, then the count of failures.
    expect(lines[0]).toMatch(message);
    expect(lines[lines.length - 1]).toMatch(/1 of 1 photo\(s\) failed/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
  });

  it.each([
    ['unknown stack', ['--stack', 'glass-on-mud'], /--stack.*glass-on-mud/],
    ['angle out of range', ['--stack', 'soap-film', '--angle', '95'], /--angle.*\[0, 90\).*95/],
    ['angle not a number', ['--stack', 'soap-film', '--angle', 'steep'], /--angle/],
    ['malformed region', ['--stack', 'soap-film', '--region', '10,10,-5,5'], /--region.*X,Y,W,H/],
    ['malformed anchor', ['--stack', 'soap-film', '--anchor', '3,4'], /--anchor.*X,Y=NM/],
    ['max thickness out of range', ['--stack', 'soap-film', '--max-thickness', '0'], /--max-thickness/],
    ['negative pixel size', ['--stack', 'soap-film', '--pixel-size', '-1'], /--pixel-size/],
  ])('%s → exit 2 naming the option', (_label, args, message) => {
    const r = lamella('good.jpg', ...args, '--out', 'out-usage');
    expect(r.status).toBe(2);
    expect(expectOneLine(r.stderr)).toMatch(message);
    expect(existsSync(join(dir, 'out-usage', 'good.json'))).toBe(false);
  });

  it('--out that is an existing file → exit 3 naming it', () => {
    const r = lamella('good.jpg', '--stack', 'soap-film', '--out', 'a-file');
    expect(r.status).toBe(3);
    expect(expectOneLine(r.stderr)).toMatch(/a-file.*existing file/);
  });

  it('a region outside the photo → that photo fails (exit 3), the message names --region and the size', () => {
    const r = lamella('good.jpg', '--stack', 'soap-film', '--region', '40,30,50,50', '--out', 'out-region');
    expect(r.status).toBe(3);
    expect(r.stderr).toMatch(/good\.jpg.*--region 40,30,50,50.*64×48/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
  });

  it('an anchor outside the photo → that photo fails (exit 3), the message names --anchor', () => {
    const r = lamella('good.jpg', '--stack', 'soap-film', '--anchor', '100,10=300', '--out', 'out-anchor');
    expect(r.status).toBe(3);
    expect(r.stderr).toMatch(/good\.jpg.*--anchor 100,10.*64×48/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
  });

  it('a grey-scale photo says it has no colour and suggests a single-line light; with one it maps', () => {
    const r = lamella('grey.png', '--stack', 'soap-film', '--out', 'out-grey');
    expect(r.status).toBe(3);
    expect(r.stderr).toMatch(/grey\.png.*grey-scale.*no colour.*line:/);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    const mono = lamella('grey.png', '--stack', 'soap-film', '--light', 'line:546', '--out', 'out-grey-mono', '--quiet', '--no-report');
    expect(mono.stderr).not.toMatch(/grey-scale/);
    expect(mono.status).toBe(0);
    expect(existsSync(join(dir, 'out-grey-mono', 'grey.thickness.npy'))).toBe(true);
  });

  it('one bad photo among good ones: the good ones are mapped, exit 3, the bad one is named', () => {
    const r = lamella('good.jpg', 'notes.jpg', 'good2.png', '--stack', 'soap-film', '--out', 'out-mixed', '--no-report');
    expect(r.status).toBe(3);
    for (const stem of ['good', 'good2']) {
      for (const suffix of ['.thickness.npy', '.thickness.tif', '.json', '.map.png']) {
        expect(existsSync(join(dir, 'out-mixed', stem + suffix)), stem + suffix).toBe(true);
      }
    }
    expect(existsSync(join(dir, 'out-mixed', 'notes.json'))).toBe(false);
    const errors = r.stderr.split('\n').filter((l) => l.startsWith('lamella: ') && !l.startsWith('lamella: warning'));
    expect(errors).toHaveLength(2);
    expect(errors[0]).toMatch(/notes\.jpg.*not an image/);
    expect(errors[1]).toMatch(/1 of 3 photo\(s\) failed/);
    // The summary lines on stdout name both good photos.
    expect(r.stdout).toMatch(/good\.jpg: median/);
    expect(r.stdout).toMatch(/good2\.png: median/);
  });
});
