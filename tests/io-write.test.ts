/**
 * Writers and file safety: writeImage(), encodePng()/encodeJpeg(), rasteriseSvg(),
 * atomicWriteFile(), ensureOutputDir(), the temp-file registry. Files are read back with the
 * image codec's own reader (sharp), not with our readPhoto, so the loop is not closed on itself.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdir, mkdtemp, readdir, readFile, rm, stat, writeFile } from 'node:fs/promises';
import { existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { atomicWriteFile, encodeJpeg, encodePng, ensureOutputDir, rasteriseSvg, writeImage } from '../src/io/index.js';
import { cleanupTempFiles, pendingTempFiles, removeTempFilesOnSignals } from '../src/io/tempFiles.js';
import { registerTempFile } from '../src/io/tempFiles.js';
import { composeImagePng } from '../src/io/composeImage.js';
import { InputError, UsageError } from '../src/cli/errors.js';

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-io-write-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

async function rawOf(path: string | Buffer, depth: 'uchar' | 'ushort' = 'uchar') {
  const meta = await sharp(path).metadata();
  const space = meta.channels <= 2 ? (depth === 'ushort' ? 'grey16' : 'b-w') : depth === 'ushort' ? 'rgb16' : 'srgb';
  const { data, info } = await sharp(path).toColourspace(space).raw({ depth }).toBuffer({ resolveWithObject: true });
  const values = depth === 'ushort' ? Array.from(new Uint16Array(data.buffer, data.byteOffset, data.length / 2)) : Array.from(data);
  return { meta, info, values };
}

describe('writeImage() formats and bit depths', () => {
  const rgb8 = { data: Uint8Array.from([255, 0, 0, 0, 255, 0, 0, 0, 255, 10, 20, 30]), width: 2, height: 2, channels: 3 as const };
  const rgb16 = { data: Uint16Array.from([0, 1, 2, 257, 30000, 65535]), width: 2, height: 1, channels: 3 as const };

  it('8-bit PNG is lossless', async () => {
    const path = join(dir, 'a.png');
    await writeImage(path, rgb8);
    const back = await rawOf(path);
    expect([back.meta.format, back.meta.depth]).toEqual(['png', 'uchar']);
    expect(back.values).toEqual(Array.from(rgb8.data));
  });

  it('16-bit data gives a lossless 16-bit PNG', async () => {
    const path = join(dir, 'a16.png');
    await writeImage(path, rgb16);
    const back = await rawOf(path, 'ushort');
    expect([back.meta.format, back.meta.depth, back.meta.bitsPerSample]).toEqual(['png', 'ushort', 16]);
    expect(back.values).toEqual(Array.from(rgb16.data));
  });

  it('16-bit data gives a lossless 16-bit TIFF (.tif)', async () => {
    const path = join(dir, 'a16.tif');
    await writeImage(path, rgb16);
    const back = await rawOf(path, 'ushort');
    expect([back.meta.format, back.meta.depth]).toEqual(['tiff', 'ushort']);
    expect(back.values).toEqual(Array.from(rgb16.data));
  });

  it('grey 16-bit stays one channel; RGBA keeps alpha', async () => {
    const grey = join(dir, 'g16.png');
    await writeImage(grey, { data: Uint16Array.from([0, 40000, 65535]), width: 3, height: 1, channels: 1 });
    const g = await rawOf(grey, 'ushort');
    expect([g.meta.channels, g.values]).toEqual([1, [0, 40000, 65535]]);
    const rgba = join(dir, 'rgba.png');
    await writeImage(rgba, { data: Uint8Array.from([1, 2, 3, 0, 4, 5, 6, 200]), width: 2, height: 1, channels: 4 });
    const { data, info } = await sharp(rgba).raw().toBuffer({ resolveWithObject: true });
    expect([info.channels, Array.from(data)]).toEqual([4, [1, 2, 3, 0, 4, 5, 6, 200]]);
  });

  it('JPEG (.jpeg) at quality 95 is within 3 codes of a flat source', async () => {
    const flat = { data: new Uint8Array(16 * 16 * 3), width: 16, height: 16, channels: 3 as const };
    for (let i = 0; i < flat.data.length; i += 3) flat.data.set([180, 90, 30], i);
    const path = join(dir, 'flat.jpeg');
    await writeImage(path, flat, { quality: 95 });
    const back = await rawOf(path);
    expect(back.meta.format).toBe('jpeg');
    const worst = Math.max(...back.values.map((v, i) => Math.abs(v - flat.data[i])));
    expect(worst).toBeLessThanOrEqual(3);
  });

  it('options.format overrides the extension', async () => {
    const path = join(dir, 'really-png.out');
    await writeImage(path, rgb8, { format: 'png' });
    expect((await sharp(path).metadata()).format).toBe('png');
  });

  it('refuses 16-bit JPEG, unknown extensions and malformed images with named errors', async () => {
    await expect(writeImage(join(dir, 'x.jpg'), rgb16)).rejects.toThrow(/JPEG is 8-bit only/);
    await expect(writeImage(join(dir, 'x.bmp'), rgb8)).rejects.toThrow(/cannot tell the image format/);
    await expect(writeImage(join(dir, 'x.png'), { ...rgb8, width: 3 })).rejects.toThrow(/image\.data must hold width × height × channels = 18 samples, received 12/);
    await expect(writeImage(join(dir, 'x.png'), { ...rgb8, channels: 5 as never })).rejects.toThrow(/channels must be 1, 2, 3 or 4/);
    await expect(encodeJpeg(rgb8, 0)).rejects.toThrow(/quality must be an integer from 1 to 100, received 0/);
    expect(existsSync(join(dir, 'x.png'))).toBe(false);
  });
});

describe('encodePng()/encodeJpeg() for embedding', () => {
  it('return PNG and JPEG signatures (ISO/IEC 15948 §5.2; ITU-T T.81 SOI marker FFD8)', async () => {
    const image = { data: new Uint8Array(4 * 4 * 3).fill(128), width: 4, height: 4, channels: 3 as const };
    const png = await encodePng(image);
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    const jpeg = await encodeJpeg(image, 80);
    expect([jpeg[0], jpeg[1]]).toEqual([0xff, 0xd8]);
  });
});

describe('composeImagePng() places a raster on a canvas and draws SVG overlays on top', () => {
  it('image at its offset, background elsewhere, overlay over both', async () => {
    const image = { data: new Uint8Array(4 * 2 * 3).fill(0).map((_, i) => (i % 3 === 1 ? 200 : 0)), width: 4, height: 2, channels: 3 as const };
    const overlay = '<svg xmlns="http://www.w3.org/2000/svg" width="10" height="6"><rect x="0" y="5" width="10" height="1" fill="#0000ff"/></svg>';
    const png = await composeImagePng({ canvasWidth: 10, canvasHeight: 6, background: '#ffffff', image, imageLeft: 3, imageTop: 1, overlays: [overlay] });
    const { data, info } = await sharp(png).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    expect([info.width, info.height]).toEqual([10, 6]);
    const at = (x: number, y: number) => Array.from(data.subarray((y * 10 + x) * 3, (y * 10 + x) * 3 + 3));
    expect(at(0, 0)).toEqual([255, 255, 255]);
    expect(at(3, 1)).toEqual([0, 200, 0]);
    expect(at(6, 2)).toEqual([0, 200, 0]);
    expect(at(7, 2)).toEqual([255, 255, 255]);
    expect(at(4, 5)).toEqual([0, 0, 255]);
  });
  it('a small overlay at an offset is drawn there only, and a half-transparent fill blends (source over)', async () => {
    const image = { data: new Uint8Array(10 * 6 * 3).fill(200), width: 10, height: 6, channels: 3 as const };
    // 3 × 2 opaque red at (6, 3) and a 2 × 1 black at 50 % opacity at (0, 0) (SVG fill-opacity).
    const red = { svg: '<svg xmlns="http://www.w3.org/2000/svg" width="3" height="2"><rect width="3" height="2" fill="#ff0000"/></svg>', left: 6, top: 3 };
    const grey = { svg: '<svg xmlns="http://www.w3.org/2000/svg" width="2" height="1"><rect width="2" height="1" fill="#000000" fill-opacity="0.5"/></svg>', left: 0, top: 0 };
    const png = await composeImagePng({ canvasWidth: 10, canvasHeight: 6, background: '#fff', image, imageLeft: 0, imageTop: 0, overlays: [red, grey] });
    const { data } = await sharp(png).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    const at = (x: number, y: number) => Array.from(data.subarray((y * 10 + x) * 3, (y * 10 + x) * 3 + 3));
    expect(at(6, 3)).toEqual([255, 0, 0]);
    expect(at(8, 4)).toEqual([255, 0, 0]);
    expect(at(5, 3)).toEqual([200, 200, 200]);
    expect(at(9, 5)).toEqual([200, 200, 200]);
    // 200 × (1 − α) with α = 0.5 (±1 for the rasteriser's 8-bit alpha): 100.
    for (const v of at(0, 0)) expect(Math.abs(v - 100)).toBeLessThanOrEqual(1);
    expect(at(2, 0)).toEqual([200, 200, 200]);
  });

  it('refuses a background that is not #rgb or #rrggbb', async () => {
    const image = { data: new Uint8Array(3), width: 1, height: 1, channels: 3 as const };
    await expect(composeImagePng({ canvasWidth: 2, canvasHeight: 2, background: 'white', image, imageLeft: 0, imageTop: 0, overlays: [] })).rejects.toThrow(
      /background must be a colour '#rrggbb' or '#rgb', received "white"/,
    );
  });

  it('refuses 16-bit data', async () => {
    const image = { data: new Uint16Array(3), width: 1, height: 1, channels: 3 as const };
    await expect(composeImagePng({ canvasWidth: 2, canvasHeight: 2, background: '#000', image, imageLeft: 0, imageTop: 0, overlays: [] })).rejects.toThrow(/8-bit images/);
  });
});

describe('rasteriseSvg()', () => {
  const frame = (body: string) => `<svg xmlns="http://www.w3.org/2000/svg" width="120" height="40"><rect width="120" height="40" fill="#ffffff"/>${body}</svg>`;

  it('draws shapes at their place and size', async () => {
    const png = await rasteriseSvg(frame('<rect x="10" y="10" width="20" height="10" fill="#ff0000"/>'));
    const { data, info } = await sharp(png).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    expect([info.width, info.height]).toEqual([120, 40]);
    const at = (x: number, y: number) => Array.from(data.subarray((y * 120 + x) * 3, (y * 120 + x) * 3 + 3));
    expect(at(20, 15)).toEqual([255, 0, 0]);
    expect(at(50, 15)).toEqual([255, 255, 255]);
  });

  it('renders text: dark pixels appear where the text is, none without it', async () => {
    const darkPixels = async (svg: string) => {
      const { data } = await sharp(await rasteriseSvg(svg)).greyscale().raw().toBuffer({ resolveWithObject: true });
      return data.reduce((n, v) => n + (v < 128 ? 1 : 0), 0);
    };
    expect(await darkPixels(frame(''))).toBe(0);
    expect(await darkPixels(frame('<text x="5" y="28" font-family="sans-serif" font-size="20" fill="#000">Film 250 nm</text>'))).toBeGreaterThan(40);
  });

  it('density scales the raster', async () => {
    const png = await rasteriseSvg(frame(''), { density: 144 });
    expect((await sharp(png).metadata()).width).toBe(240);
  });

  it('refuses something that is not SVG', async () => {
    await expect(rasteriseSvg('<html></html>')).rejects.toThrow(/svg must be a string holding an <svg> element/);
  });
});

describe('atomicWriteFile()', () => {
  it('writes the bytes and leaves no temp file', async () => {
    const sub = join(dir, 'atomic-ok');
    await mkdir(sub);
    await atomicWriteFile(join(sub, 'out.bin'), Buffer.from('hello'));
    expect((await readFile(join(sub, 'out.bin'))).toString()).toBe('hello');
    expect(await readdir(sub)).toEqual(['out.bin']);
  });

  it('replaces an existing file whole', async () => {
    const sub = join(dir, 'atomic-replace');
    await mkdir(sub);
    await writeFile(join(sub, 'out.bin'), 'old content that is longer');
    await atomicWriteFile(join(sub, 'out.bin'), Buffer.from('new'));
    expect((await readFile(join(sub, 'out.bin'))).toString()).toBe('new');
  });

  it('on failure (target is a folder) throws InputError, keeps the target and leaves no temp file', async () => {
    const sub = join(dir, 'atomic-fail');
    await mkdir(join(sub, 'target'), { recursive: true });
    const error = await atomicWriteFile(join(sub, 'target'), Buffer.from('x')).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(InputError);
    expect((error as Error).message).toMatch(/cannot write output file/);
    expect(await readdir(sub)).toEqual(['target']);
    expect((await stat(join(sub, 'target'))).isDirectory()).toBe(true);
    expect(pendingTempFiles()).toEqual([]);
  });

  it('fails cleanly when the folder does not exist', async () => {
    await expect(atomicWriteFile(join(dir, 'missing-folder', 'out.bin'), Buffer.from('x'))).rejects.toThrow(/missing-folder\/out\.bin: cannot write output file/);
  });
});

describe('cleanupTempFiles() removes registered in-flight files (what the interrupt handler calls)', () => {
  it('removes registered files, tolerates ones already gone, and empties the registry', async () => {
    const a = join(dir, '.a.tmp');
    const b = join(dir, '.b.tmp');
    await writeFile(a, 'partial');
    registerTempFile(a);
    registerTempFile(b); // never created
    expect(pendingTempFiles().sort()).toEqual([a, b].sort());
    expect(cleanupTempFiles()).toBe(1);
    expect(existsSync(a)).toBe(false);
    expect(pendingTempFiles()).toEqual([]);
  });
});

describe('removeTempFilesOnSignals() installs an interrupt handler that removes partial files', () => {
  it('on SIGINT the handler deletes in-flight temp files and exits with 130 (128 + signal 2, common practice)', async () => {
    const before = new Set(process.listeners('SIGINT'));
    const beforeTerm = new Set(process.listeners('SIGTERM'));
    removeTempFilesOnSignals();
    removeTempFilesOnSignals(); // idempotent: one handler only
    const added = process.listeners('SIGINT').filter((l) => !before.has(l));
    expect(added.length).toBe(1);
    const partial = join(dir, '.partial.tmp');
    await writeFile(partial, 'half a file');
    registerTempFile(partial);
    const exit = vi.spyOn(process, 'exit').mockImplementation((() => undefined) as never);
    try {
      (added[0] as (signal: NodeJS.Signals) => void)('SIGINT');
      expect(existsSync(partial)).toBe(false);
      expect(exit).toHaveBeenCalledWith(130);
    } finally {
      exit.mockRestore();
      for (const l of added) process.removeListener('SIGINT', l);
      for (const l of process.listeners('SIGTERM').filter((l) => !beforeTerm.has(l))) process.removeListener('SIGTERM', l);
    }
  });
});

describe('ensureOutputDir()', () => {
  it('creates a missing folder (with parents) and returns its absolute path', async () => {
    const target = join(dir, 'out', 'deep');
    expect(await ensureOutputDir(target)).toBe(target);
    expect((await stat(target)).isDirectory()).toBe(true);
  });

  it('refuses a path that is an existing file', async () => {
    const file = join(dir, 'plain-file');
    await writeFile(file, 'x');
    await expect(ensureOutputDir(file)).rejects.toThrow(/plain-file: output folder path is an existing file, expected a folder/);
  });

  it('allows the inputs\' folder, but never an output that would overwrite an input', async () => {
    const folder = join(dir, 'shots');
    await mkdir(folder);
    const input = join(folder, 'film.png');
    await writeFile(input, 'x');
    await expect(ensureOutputDir(folder, { inputs: [input], outputs: [join(folder, 'film-thickness.png')] })).resolves.toBe(folder);
    const error = await ensureOutputDir(folder, { inputs: [input], outputs: [join(folder, '.', 'film.png')] }).catch((e: unknown) => e);
    // A usage error (exit 2) naming both the output and the input.
    expect(error).toBeInstanceOf(UsageError);
    expect((error as Error).message).toBe(`${join(folder, '.', 'film.png')}: output would overwrite an input file (it is the input file ${input}); choose another output folder or name`);
  });
});
