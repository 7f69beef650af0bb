/**
 * Smaller holes: numbers are read as decimals only, out-of-range options are usage errors
 * (exit 2) naming the option, long photo names work, a fully transparent photo is "no film",
 * size messages show enough digits to differ, damaged PNGs are named as such.
 *
 * Photos: the bundled demo frame `fixtures/demo/film_001.jpg` (INVENTED, rendered by our own
 * forward model) and pictures made here (invented).
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseDecimal } from '../src/cli/parseDecimal.js';
import { pngHeaderClaiming } from './png-header.js';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const demo = new URL('../fixtures/demo/', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-lesser-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const cli = (...args: string[]) => spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8' });

beforeAll(() => copyFileSync(join(demo, 'film_001.jpg'), join(dir, 'p.jpg')));

describe('numbers are decimal', () => {
  it.each([['12', 12], ['-0.5', -0.5], ['.25', 0.25], ['1.5e3', 1500], [' 7 ', 7]])('%j is %d', (text, value) => {
    expect(parseDecimal(text)).toBe(value);
  });
  it.each(['0x10', '0b11', '0o7', 'Infinity', '', '1,5', '12abc', '1e'])('%j is not a number', (text) => {
    expect(parseDecimal(text)).toBeNaN();
  });
});

describe('out-of-range options are usage errors naming the option (exit 2, before any photo)', () => {
  it.each([
    [['--angle', '0x10'], 'lamella: --angle must be a number of degrees in [0, 90), received "0x10"'],
    [['--max-thickness', '0.001'], 'lamella: --max-thickness must be a number of nm from 10 to 20000, received 0.001'],
    [['--anchor', '5,5=3000'], 'lamella: --anchor 5,5=3000 lies above --max-thickness 2000 nm; raise --max-thickness or correct the anchor'],
    [['--anchor', '0x5,5=300'], 'lamella: --anchor must be X,Y=NM (a pixel and its known thickness in nm), received "0x5,5"'],
    [['--pixel-size', '1e300'], 'lamella: --pixel-size must be a number of micrometres > 0 and at most 1e6 (1 m), received 1e300'],
    [['--threads', '0x2'], 'lamella: --threads must be a whole number from 1 to 64, received 0x2'],
  ])('map %j', (args, message) => {
    const r = cli('map', 'p.jpg', '--stack', 'soap-film', ...args, '--out', 'o');
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe(message);
  });
  it.each([
    [['--interval', '1e308'], 'lamella: --interval must be a number of seconds > 0 and at most 31536000 (a year), received 1e308'],
    [['--fps', '1e9'], 'lamella: --fps must be a number of frames per second from 1/31536000 (one a year) to 1e6, received 1e9'],
  ])('series %j', (args, message) => {
    const r = cli('series', 'p.jpg', '--stack', 'soap-film', ...args, '--out', 'o');
    expect(r.status).toBe(2);
    expect(r.stderr.trim()).toBe(message);
  });
});

describe('photos', () => {
  it('a photo name of 240 characters maps (its temp and staging names stay within the 255-byte limit)', () => {
    const name = `${'n'.repeat(236)}.jpg`;
    copyFileSync(join(dir, 'p.jpg'), join(dir, name));
    const r = cli('map', name, '--stack', 'soap-film', '--quiet', '--out', 'long');
    expect(r.status, r.stderr).toBe(0);
    expect(readdirSync(join(dir, 'long'))).toContain(`${'n'.repeat(236)}.confidence.npy`);
  }, 60_000);

  it('a fully transparent photo (transparent black) is "no film", not grey-scale', async () => {
    await sharp({ create: { width: 32, height: 24, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } }).png().toFile(join(dir, 'clear.png'));
    const r = cli('map', 'clear.png', '--stack', 'soap-film', '--out', 'o');
    expect(r.status).toBe(3);
    expect(r.stderr.split('\n')[0]).toBe('lamella: clear.png: holds no film: every pixel is transparent');
  });

  it('a photo just over the 50 MP limit shows enough digits to differ from the limit', () => {
    // 7072 × 7071 = 50 006 112 pixels: "50 MP" at three digits, like the limit itself.
    writeFileSync(join(dir, 'just-over.png'), pngHeaderClaiming(7072, 7071));
    const r = cli('map', 'just-over.png', '--stack', 'soap-film', '--out', 'o');
    expect(r.status).toBe(3);
    expect(r.stderr).toContain('image has 7072×7071 pixels (50.01 MP), more than the limit of 50000000 pixels (50 MP)');
  });

  it('a PNG with a wrong chunk checksum is a "damaged PNG", not an unknown error', async () => {
    const png = Buffer.from(await sharp(join(dir, 'p.jpg')).png().toBuffer());
    // Flip one bit of the IHDR chunk's CRC (PNG: ISO/IEC 15948, 5.3 chunk layout: length, type, data, CRC).
    const length = png.readUInt32BE(8);
    png.writeUInt32BE((png.readUInt32BE(16 + length) ^ 1) >>> 0, 16 + length);
    writeFileSync(join(dir, 'crc.png'), png);
    const r = cli('map', 'crc.png', '--stack', 'soap-film', '--out', 'o');
    expect(r.status).toBe(3);
    expect(r.stderr.split('\n')[0]).toMatch(/^lamella: crc\.png: damaged PNG: a checksum \(CRC\) does not match its data \(.*CRC error\); add --allow-damaged to map what decodes$/);
    expect(readFileSync(join(dir, 'crc.png')).length).toBe(png.length);
  });
});
