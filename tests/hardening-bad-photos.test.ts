/**
 * Bad photos are not mapped as if they were good: a JPEG the decoder itself reports as damaged
 * (corrupt entropy-coded data, a header claiming more rows than the data holds, a file cut short)
 * is refused with one line naming the file, exit 3, unless `--allow-damaged` is given, which maps
 * what decodes, gives the rest no estimate and says so.
 *
 * Photos: the bundled demo frame `fixtures/demo/film_001.jpg` (INVENTED, rendered by our own
 * forward model), damaged here on purpose. JPEG structure: a baseline frame header SOF0 (marker
 * FFC0) holds the number of lines at bytes 5–6 after the marker (ITU-T T.81, B.2.2).
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const demo = new URL('../fixtures/demo/', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-bad-photos-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const cli = (...args: string[]) => spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8' });

const original = readFileSync(join(demo, 'film_001.jpg'));

/** The demo frame with its SOF0 line count set to `rows` (the data still holds 240). */
function taller(rows: number): Buffer {
  const bytes = Buffer.from(original);
  let i = 2;
  while (i < bytes.length && bytes[i] === 0xff) {
    const marker = bytes[i + 1];
    if (marker === 0xc0 || marker === 0xc2) {
      bytes.writeUInt16BE(rows, i + 5);
      return bytes;
    }
    i += 2 + bytes.readUInt16BE(i + 2);
  }
  throw new Error('no SOF marker in the demo frame');
}

/** The demo frame with 40 bytes of its scan overwritten at 60 % of the file. */
function corrupted(): Buffer {
  const bytes = Buffer.from(original);
  const at = Math.floor(bytes.length * 0.6);
  bytes.fill(0xff, at, at + 40);
  return bytes;
}

mkdirSync(dir, { recursive: true });
writeFileSync(join(dir, 'tall.jpg'), taller(480));
writeFileSync(join(dir, 'corrupt.jpg'), corrupted());
writeFileSync(join(dir, 'cut.jpg'), original.subarray(0, Math.floor(original.length / 2)));

describe('damaged JPEGs', () => {
  it.each([
    ['a header claiming 480 rows for 240 rows of data', 'tall.jpg', 'Corrupt JPEG data: premature end of data segment'],
    ['corrupt scan data', 'corrupt.jpg', 'Corrupt JPEG data'],
    ['a file cut in half', 'cut.jpg', 'premature end of JPEG image'],
  ])('%s: map refuses it with one line, exit 3, nothing written', (_what, name, cause) => {
    const r = cli('map', name, '--stack', 'soap-film', '--out', `out-${name}`);
    expect(r.status).toBe(3);
    const lines = r.stderr.trim().split('\n');
    expect(lines[0]).toContain(`lamella: ${name}: image file is truncated or corrupt (`);
    expect(lines[0]).toContain(cause);
    expect(lines[0]).toMatch(/; add --allow-damaged to map what decodes$/);
    expect(spawnSync('ls', ['-A', join(dir, `out-${name}`)], { encoding: 'utf8' }).stdout).toBe('');
  }, 60_000);

  it('calibrate and series refuse it too', () => {
    const cal = cli('calibrate', 'tall.jpg', '--stack', 'soap-film', '--known', '10,10,20,20=300', '--out', 'cal.json');
    expect(cal.status).toBe(3);
    expect(cal.stderr).toContain('tall.jpg: image file is truncated or corrupt');
    const series = cli('series', 'corrupt.jpg', join(demo, 'film_002.jpg'), '--stack', 'soap-film', '--fps', '1', '--workers', '1', '--quiet', '--out', 'series-out');
    expect(series.status).toBe(3);
    expect(series.stderr).toContain('corrupt.jpg: image file is truncated or corrupt');
  }, 120_000);

  it('--allow-damaged maps what decodes: the 480-row header gives a 480-row map whose undecoded rows have no estimate', () => {
    const r = cli('map', 'tall.jpg', '--stack', 'soap-film', '--allow-damaged', '--no-report', '--quiet', '--out', 'allowed');
    expect(r.status, r.stderr).toBe(0);
    const record = JSON.parse(readFileSync(join(dir, 'allowed', 'tall.json'), 'utf8')) as { height_px: number; width_px: number; warnings: string[] };
    expect([record.width_px, record.height_px]).toEqual([320, 480]);
    // With --quiet the record is what says the photo was damaged (common practice: a result
    // file carries its own caveats).
    expect(record.warnings[0]).toMatch(/^damaged image \(.*\); mapped what decodes/);
    // The .npy map: rows from the first undecoded one down are all NaN.
    const npy = readFileSync(join(dir, 'allowed', 'tall.thickness.npy'));
    const headerLength = npy.readUInt16LE(8);
    const values = new Float32Array(npy.buffer.slice(npy.byteOffset + 10 + headerLength, npy.byteOffset + npy.length));
    expect(values.length).toBe(320 * 480);
    const rowHasEstimate = (y: number): boolean => values.subarray(y * 320, (y + 1) * 320).some((v) => !Number.isNaN(v));
    expect(rowHasEstimate(100)).toBe(true);
    for (const y of [260, 300, 479]) expect(rowHasEstimate(y)).toBe(false);
    const warn = cli('map', 'tall.jpg', '--stack', 'soap-film', '--allow-damaged', '--no-report', '--out', 'allowed2');
    expect(warn.stderr).toMatch(/lamella: warning: tall\.jpg: damaged image \(.*premature end of data segment\); mapped what decodes, the \d+ row\(s\) from row \d+ on that did not decode have no estimate/);
    expect(warn.stderr.split('damaged image (').length - 1).toBe(1);
  }, 120_000);
});

describe('previews do not limit which photos can be mapped; multi-page files say which page', () => {
  it('a photo 33 000 rows tall (over the SVG rasteriser\'s 32 767) is mapped, its map.png written as a preview of at most 2,000 rows', async () => {
    const sharp = (await import('sharp')).default;
    await sharp(join(demo, 'film_001.jpg')).resize(16, 33_000, { fit: 'fill' }).png().toFile(join(dir, 'tall33k.png'));
    const r = cli('map', 'tall33k.png', '--stack', 'soap-film', '--quiet', '--out', 'tall-out');
    expect(r.status, r.stderr).toBe(0);
    const meta = await sharp(join(dir, 'tall-out', 'tall33k.map.png')).metadata();
    // Every 17th row (the smallest whole step within 2,000): 1,942 rows, plus title and margin.
    expect(meta.height).toBeGreaterThan(1942);
    expect(meta.height).toBeLessThan(2100);
    const npy = readFileSync(join(dir, 'tall-out', 'tall33k.thickness.npy'));
    expect(npy.toString('latin1', 10, 10 + npy.readUInt16LE(8))).toContain("'shape': (33000, 16)");
  }, 120_000);

  it('a two-page TIFF: mapped from page 1, with a warning that says so', async () => {
    const sharp = (await import('sharp')).default;
    const page = (colour: string) => sharp({ create: { width: 16, height: 12, channels: 3, background: colour } }).png().toBuffer();
    await sharp([await page('#a08060'), await page('#406080')], { join: { animated: true } }).tiff().toFile(join(dir, 'two.tif'));
    const r = cli('map', 'two.tif', '--stack', 'soap-film', '--no-report', '--out', 'two-out');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toContain('lamella: warning: two.tif: the file holds 2 pages (images); page 1 of 2 was used (split the pages into separate files to map the others)');
  }, 60_000);
});

describe('implausible EXIF capture times in a series', () => {
  it('are named in a usage error (exit 2) that says which option to give; with --interval they are a warning', async () => {
    const sharp = (await import('sharp')).default;
    const folder = join(dir, 'exif-frames');
    mkdirSync(folder, { recursive: true });
    // Invented capture times: a zeroed clock and a month 13 (CIPA DC-008 form "YYYY:MM:DD HH:MM:SS").
    const times = ['2025:03:01 10:00:00', '0000:00:00 00:00:00', '2025:13:01 10:00:02'];
    for (const [i, time] of times.entries()) {
      await sharp(join(demo, `film_00${i + 1}.jpg`)).withExif({ IFD2: { DateTimeOriginal: time } }).jpeg({ quality: 95 }).toFile(join(folder, `e${i + 1}.jpg`));
    }
    const refused = cli('series', 'exif-frames', '--stack', 'soap-film', '--workers', '1', '--out', 'exif-out');
    expect(refused.status).toBe(2);
    expect(refused.stderr.trim()).toBe(
      'lamella: frame times: implausible EXIF capture times: e2.jpg (impossible DateTimeOriginal (a field out of range, e.g. month 13 or 0000:00:00)), e3.jpg (impossible DateTimeOriginal (a field out of range, e.g. month 13 or 0000:00:00)); give --fps or --interval to time the frames uniformly',
    );
    const timed = cli('series', 'exif-frames', '--stack', 'soap-film', '--workers', '1', '--interval', '0.5', '--out', 'exif-out');
    expect(timed.status, timed.stderr).toBe(0);
    expect(timed.stderr).toContain('lamella: warning: implausible EXIF capture times: e2.jpg');
    expect(timed.stderr).not.toMatch(/intervalS|\bfps or\b(?! --)/);
    const rows = readFileSync(join(dir, 'exif-out', 'series.csv'), 'utf8').trim().split('\n').slice(1);
    expect(rows.map((r) => r.split(',')[1])).toEqual(['0.000', '0.500', '1.000']);
  }, 120_000);
});
