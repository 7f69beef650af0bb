/**
 * readPhoto() and readPhotoMetadata(): every image is generated here with the image codec into a
 * temp folder. Expected values follow from how the files were made (encoded value / 255 or
 * / 65535, common practice for normalised pixel values) and, for orientation, from the EXIF /
 * TIFF Orientation tag definition (TIFF Revision 6.0, Adobe 1992, tag 274; CIPA DC-008-2012
 * Exif 2.3, section 4.6.4 A, "Orientation").
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtemp, rm, writeFile, mkdir, copyFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { pngHeaderClaiming } from './png-header.js';
import { join } from 'node:path';
import sharp from 'sharp';
import { MAX_PIXELS, parseExifTime, readPhoto, readPhotoMetadata } from '../src/io/index.js';
import { InputError } from '../src/cli/errors.js';
import { pixelsOfPhoto, valueAt } from '../src/map/photoPixels.js';

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-io-read-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

function raw8(data: number[], width: number, height: number, channels: 1 | 2 | 3 | 4) {
  return sharp(Uint8Array.from(data), { raw: { width, height, channels } });
}

describe('readPhoto() pixel values and bit depth', () => {
  it('8-bit PNG: values are code/255, RGB interleaved, not grey', async () => {
    const path = join(dir, 'rgb8.png');
    await raw8([255, 0, 0, 0, 128, 255, 10, 20, 30, 7, 7, 7], 2, 2, 3).png().toFile(path);
    const photo = await readPhoto(path);
    expect([photo.width, photo.height, photo.bitDepth, photo.format]).toEqual([2, 2, 8, 'png']);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 255))).toEqual([255, 0, 0, 0, 128, 255, 10, 20, 30, 7, 7, 7]);
    expect(photo.rgb[4]).toBeCloseTo(128 / 255, 7);
    expect(photo.isGrey).toBe(false);
    expect(photo.hadAlpha).toBe(false);
    expect(photo.alpha).toBeUndefined();
    expect(photo.orientationApplied).toBe(1);
  });

  it('8-bit RGB keeps its codes; the floats are made on first read, in shared memory, exactly code/255 as float32, and from then on are the photo', async () => {
    const path = join(dir, 'codes8.png');
    const data = [255, 0, 0, 0, 128, 255, 10, 20, 30, 7, 7, 7];
    await raw8(data, 2, 2, 3).png().toFile(path);
    const photo = await readPhoto(path);
    expect(photo.codes).toBeInstanceOf(Uint8Array);
    expect(Array.from(photo.codes!)).toEqual(data);
    expect(pixelsOfPhoto(photo).codes).toBe(photo.codes);
    // Read twice: the same array (made once and kept), and the codes are dropped: whoever holds
    // the floats may change them, and a map must then see the change.
    const floats = photo.rgb;
    expect(photo.rgb).toBe(floats);
    expect(photo.codes).toBeUndefined();
    expect(floats.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(Array.from(floats)).toEqual(data.map((v) => Math.fround(v / 255)));
    floats[0] = 0.5;
    expect(valueAt(pixelsOfPhoto(photo), 0)).toBe(0.5);
    // Spread like any property; set like any property (codes dropped too).
    expect({ ...photo }.rgb).toBe(floats);
    const again = await readPhoto(path);
    const replaced = new Float32Array(12).fill(0.25);
    again.rgb = replaced;
    expect(again.rgb).toBe(replaced);
    expect(again.codes).toBeUndefined();
    expect(valueAt(pixelsOfPhoto(again), 4)).toBe(0.25);
  });

  it('alpha sources are held as floats only (no codes); an 8-bit grey source, expanded to RGB, keeps codes', async () => {
    const grey = join(dir, 'grey8-codes.png');
    await raw8([0, 128, 255, 7], 2, 2, 1).png().toFile(grey);
    const greyPhoto = await readPhoto(grey);
    expect(Array.from(greyPhoto.codes!)).toEqual([0, 0, 0, 128, 128, 128, 255, 255, 255, 7, 7, 7]);
    expect(greyPhoto.isGrey).toBe(true);
    const alpha = join(dir, 'rgba8-codes.png');
    await raw8([255, 0, 0, 255, 0, 128, 255, 128], 2, 1, 4).png().toFile(alpha);
    const deepAlpha = join(dir, 'rgba16-codes.png');
    await sharp(Uint16Array.from([0, 1, 257, 65535, 30000, 30001, 40000, 65535]), { raw: { width: 2, height: 1, channels: 4 } }).toColourspace('rgb16').png().toFile(deepAlpha);
    for (const path of [alpha, deepAlpha]) {
      const photo = await readPhoto(path);
      expect(photo.codes, path).toBeUndefined();
      expect(photo.rgb.length).toBe(photo.width * photo.height * 3);
    }
  });

  it('16-bit RGB keeps its codes (two bytes a channel); the floats, made on first read, are exactly code/65535 as float32', async () => {
    const path = join(dir, 'rgb16-codes.png');
    // Codes one apart within one 8-bit step (30000, 30001), both ends, and 257 (8-bit 1 widened).
    const data = [0, 1, 257, 65535, 30000, 30001, 12345, 54321, 65534, 2, 2, 2];
    await sharp(Uint16Array.from(data), { raw: { width: 2, height: 2, channels: 3 } }).toColourspace('rgb16').png().toFile(path);
    const photo = await readPhoto(path);
    expect(photo.bitDepth).toBe(16);
    expect(photo.codes).toBeInstanceOf(Uint16Array);
    expect(Array.from(photo.codes!)).toEqual(data);
    const pixels = pixelsOfPhoto(photo);
    expect(pixels.codes).toBe(photo.codes);
    // The mapper's reads are the definition's values: code / 65535 rounded to float32.
    for (let k = 0; k < data.length; k++) expect(valueAt(pixels, k)).toBe(Math.fround(data[k] / 65535));
    expect(photo.isGrey).toBe(false);
    const floats = photo.rgb;
    expect(photo.codes).toBeUndefined();
    expect(floats.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(Array.from(floats)).toEqual(data.map((v) => Math.fround(v / 65535)));
    // Grey at 16 bits is found on the codes too.
    const grey = join(dir, 'grey-rgb16.png');
    await sharp(Uint16Array.from([5, 5, 5, 60000, 60000, 60000]), { raw: { width: 2, height: 1, channels: 3 } }).toColourspace('rgb16').png().toFile(grey);
    const greyPhoto = await readPhoto(grey);
    expect(greyPhoto.codes).toBeInstanceOf(Uint16Array);
    expect(greyPhoto.isGrey).toBe(true);
  });

  it('an 8-bit RGB photo whose pixels are all grey is grey; one coloured pixel at the end makes it colour', async () => {
    const allGrey = join(dir, 'allgrey-rgb.png');
    await raw8([9, 9, 9, 200, 200, 200, 0, 0, 0, 31, 31, 31], 2, 2, 3).png().toFile(allGrey);
    expect((await readPhoto(allGrey)).isGrey).toBe(true);
    const lastColoured = join(dir, 'lastcoloured-rgb.png');
    await raw8([9, 9, 9, 200, 200, 200, 0, 0, 0, 31, 31, 32], 2, 2, 3).png().toFile(lastColoured);
    expect((await readPhoto(lastColoured)).isGrey).toBe(false);
  });

  it('16-bit PNG is read at 16 bits: values are code/65535, distinct codes within one 8-bit step stay distinct', async () => {
    const path = join(dir, 'rgb16.png');
    const codes = [0, 1, 257, 65535, 30000, 30001];
    await sharp(Uint16Array.from(codes), { raw: { width: 2, height: 1, channels: 3 } }).toColourspace('rgb16').png().toFile(path);
    const photo = await readPhoto(path);
    expect(photo.bitDepth).toBe(16);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 65535))).toEqual(codes);
    expect(photo.rgb[5]).not.toBe(photo.rgb[4]);
  });

  it('16-bit TIFF is read at 16 bits', async () => {
    const path = join(dir, 'rgb16.tif');
    const codes = [100, 200, 300, 40000, 50000, 65535];
    await sharp(Uint16Array.from(codes), { raw: { width: 2, height: 1, channels: 3 } }).toColourspace('rgb16').tiff({ compression: 'lzw' }).toFile(path);
    const photo = await readPhoto(path);
    expect([photo.bitDepth, photo.format]).toEqual([16, 'tiff']);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 65535))).toEqual(codes);
  });

  it('JPEG of a flat colour decodes to that colour within 2 codes (lossy, quality 95, 4:4:4)', async () => {
    const path = join(dir, 'flat.jpg');
    await sharp({ create: { width: 16, height: 16, channels: 3, background: { r: 200, g: 120, b: 40 } } })
      .jpeg({ quality: 95, chromaSubsampling: '4:4:4' })
      .toFile(path);
    const photo = await readPhoto(path);
    expect([photo.format, photo.bitDepth]).toEqual(['jpeg', 8]);
    const centre = (8 * 16 + 8) * 3;
    expect(Math.abs(photo.rgb[centre] * 255 - 200)).toBeLessThanOrEqual(2);
    expect(Math.abs(photo.rgb[centre + 1] * 255 - 120)).toBeLessThanOrEqual(2);
    expect(Math.abs(photo.rgb[centre + 2] * 255 - 40)).toBeLessThanOrEqual(2);
  });

  it('RGBA PNG: alpha kept apart (0..1), RGB unchanged (not premultiplied)', async () => {
    const path = join(dir, 'rgba.png');
    await raw8([10, 20, 30, 0, 40, 50, 60, 255, 70, 80, 90, 128], 3, 1, 4).png().toFile(path);
    const photo = await readPhoto(path);
    expect(photo.hadAlpha).toBe(true);
    expect(Array.from(photo.alpha!).map((v) => Math.round(v * 255))).toEqual([0, 255, 128]);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 255))).toEqual([10, 20, 30, 40, 50, 60, 70, 80, 90]);
  });

  it('grey PNG (1 channel) expands to three equal channels with isGrey', async () => {
    const path = join(dir, 'grey.png');
    await raw8([0, 50, 100, 255], 2, 2, 1).toColourspace('b-w').png().toFile(path);
    expect((await sharp(path).metadata()).channels).toBe(1);
    const photo = await readPhoto(path);
    expect(photo.isGrey).toBe(true);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 255))).toEqual([0, 0, 0, 50, 50, 50, 100, 100, 100, 255, 255, 255]);
  });

  it('grey + alpha PNG (2 channels) keeps its alpha', async () => {
    const path = join(dir, 'grey-alpha.png');
    await raw8([1, 255, 3, 0, 5, 128], 3, 1, 2).toColourspace('b-w').png().toFile(path);
    expect((await sharp(path).metadata()).channels).toBe(2);
    const photo = await readPhoto(path);
    expect(photo.isGrey).toBe(true);
    expect(photo.hadAlpha).toBe(true);
    expect(Array.from(photo.alpha!).map((v) => Math.round(v * 255))).toEqual([255, 0, 128]);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 255))).toEqual([1, 1, 1, 3, 3, 3, 5, 5, 5]);
  });

  it('16-bit grey PNG keeps 16 bits and is grey', async () => {
    const path = join(dir, 'grey16.png');
    await sharp(Uint16Array.from([0, 1, 65535]), { raw: { width: 3, height: 1, channels: 1 } }).toColourspace('grey16').png().toFile(path);
    const photo = await readPhoto(path);
    expect([photo.bitDepth, photo.isGrey]).toEqual([16, true]);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 65535))).toEqual([0, 0, 0, 1, 1, 1, 65535, 65535, 65535]);
  });

  it('an RGB file whose three channels are equal everywhere is flagged isGrey', async () => {
    const path = join(dir, 'rgb-grey.png');
    await raw8([9, 9, 9, 200, 200, 200], 2, 1, 3).png().toFile(path);
    expect((await readPhoto(path)).isGrey).toBe(true);
  });

  it('1×1 image', async () => {
    const path = join(dir, 'one.png');
    await raw8([1, 2, 3], 1, 1, 3).png().toFile(path);
    const photo = await readPhoto(path);
    expect([photo.width, photo.height, photo.rgb.length]).toEqual([1, 1, 3]);
  });
});

describe('readPhoto() and embedded colour profiles', () => {
  it('16-bit sRGB-tagged PNG is read exactly (no profile round trip), without warning', async () => {
    const path = join(dir, 'srgb16.png');
    const codes = [65535, 0, 0, 0, 65535, 0, 30000, 30000, 30000];
    await sharp(Uint16Array.from(codes), { raw: { width: 3, height: 1, channels: 3 } }).toColourspace('rgb16').withIccProfile('srgb').png().toFile(path);
    expect((await sharp(path).metadata()).hasProfile).toBe(true);
    const photo = await readPhoto(path);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 65535))).toEqual(codes);
    expect(photo.warnings).toBeUndefined();
  });

  it('16-bit file with a non-sRGB profile is read as stored and the profile is named in a warning', async () => {
    const path = join(dir, 'p316.png');
    await sharp(Uint16Array.from([1000, 2000, 3000]), { raw: { width: 1, height: 1, channels: 3 } }).toColourspace('rgb16').withIccProfile('p3').png().toFile(path);
    const photo = await readPhoto(path);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 65535))).toEqual([1000, 2000, 3000]);
    expect(photo.warnings?.join(' ')).toMatch(/colour profile ".*P3.*"; its values are used as if sRGB/);
  });

  it('8-bit sRGB-tagged file is unchanged by the profile conversion', async () => {
    const path = join(dir, 'srgb8.png');
    await raw8([255, 0, 0, 0, 255, 0, 118, 118, 118], 3, 1, 3).withIccProfile('srgb').png().toFile(path);
    const photo = await readPhoto(path);
    expect(Array.from(photo.rgb).map((v) => Math.round(v * 255))).toEqual([255, 0, 0, 0, 255, 0, 118, 118, 118]);
  });
});

describe('readPhoto() applies EXIF orientation 1–8 (TIFF 6.0 tag 274 / Exif 2.3 §4.6.4)', () => {
  // Stored pattern: 3 rows × 4 columns of 16-px blocks, each its own colour (blocks align with
  // the JPEG 8×8 grid, so colours survive compression within a few codes).
  const BLOCK = 16;
  const ROWS = 3;
  const COLS = 4;
  const colour = (r: number, c: number): [number, number, number] => [40 + 60 * c, 30 + 90 * r, ((r * 4 + c) * 53) % 256];
  /**
   * Where stored block (r, c) appears when displayed, from the tag's wording: the position of the
   * stored 0th row and 0th column in the visual image.
   */
  const displayed = (o: number, r: number, c: number): [number, number] => {
    switch (o) {
      case 1: return [r, c]; // 0th row top, 0th column left
      case 2: return [r, COLS - 1 - c]; // top, right
      case 3: return [ROWS - 1 - r, COLS - 1 - c]; // bottom, right
      case 4: return [ROWS - 1 - r, c]; // bottom, left
      case 5: return [c, r]; // 0th row left, 0th column top
      case 6: return [c, ROWS - 1 - r]; // right, top
      case 7: return [COLS - 1 - c, ROWS - 1 - r]; // right, bottom
      case 8: return [COLS - 1 - c, r]; // left, bottom
      default: throw new Error(String(o));
    }
  };
  const stored = new Uint8Array(COLS * BLOCK * ROWS * BLOCK * 3);
  for (let y = 0; y < ROWS * BLOCK; y++) {
    for (let x = 0; x < COLS * BLOCK; x++) stored.set(colour(Math.floor(y / BLOCK), Math.floor(x / BLOCK)), (y * COLS * BLOCK + x) * 3);
  }

  for (let orientation = 1; orientation <= 8; orientation++) {
    it(`orientation ${orientation}: pixels are upright and orientationApplied = ${orientation}`, async () => {
      const path = join(dir, `orient-${orientation}.jpg`);
      await sharp(stored, { raw: { width: COLS * BLOCK, height: ROWS * BLOCK, channels: 3 } })
        .jpeg({ quality: 100, chromaSubsampling: '4:4:4' })
        .withMetadata({ orientation })
        .toFile(path);
      expect((await sharp(path).metadata()).orientation).toBe(orientation);
      const photo = await readPhoto(path);
      const swapped = orientation >= 5;
      expect([photo.width, photo.height]).toEqual(swapped ? [ROWS * BLOCK, COLS * BLOCK] : [COLS * BLOCK, ROWS * BLOCK]);
      expect(photo.orientationApplied).toBe(orientation);
      for (let r = 0; r < ROWS; r++) {
        for (let c = 0; c < COLS; c++) {
          const [dr, dc] = displayed(orientation, r, c);
          const at = ((dr * BLOCK + BLOCK / 2) * photo.width + dc * BLOCK + BLOCK / 2) * 3;
          const got = [photo.rgb[at], photo.rgb[at + 1], photo.rgb[at + 2]].map((v) => v * 255);
          const want = colour(r, c);
          for (let k = 0; k < 3; k++) expect(Math.abs(got[k] - want[k]), `block (${r},${c}) channel ${k}`).toBeLessThanOrEqual(4);
        }
      }
      const meta = await readPhotoMetadata(path);
      expect([meta.width, meta.height, meta.orientation]).toEqual([photo.width, photo.height, orientation]);
    });
  }
});

describe('readPhoto() and readPhotoMetadata() read the EXIF capture time', () => {
  it.each(['2024:13:06 07:08:09', '0000:00:00 00:00:00', '2024:02:30 07:08:09', '2024:05:06 25:08:09'])('an impossible DateTimeOriginal %s gives no time but a problem', async (text) => {
    const path = join(dir, `impossible-${text.slice(0, 10).replace(/:/g, '')}.jpg`);
    await sharp({ create: { width: 4, height: 4, channels: 3, background: '#808080' } }).withExif({ IFD2: { DateTimeOriginal: text } }).jpeg().toFile(path);
    const photo = await readPhoto(path);
    expect(photo.exif.timestampS).toBeUndefined();
    expect(photo.exif.problem).toMatch(/^impossible DateTimeOriginal/);
  });
  it('DateTimeOriginal + SubSecTimeOriginal → text and seconds since epoch (local time taken as UTC)', async () => {
    const path = join(dir, 'timed.jpg');
    await sharp({ create: { width: 8, height: 8, channels: 3, background: '#808080' } })
      .jpeg()
      .withExif({ IFD2: { DateTimeOriginal: '2024:05:06 07:08:09', SubSecTimeOriginal: '25' } })
      .toFile(path);
    const expected = Date.UTC(2024, 4, 6, 7, 8, 9) / 1000 + 0.25;
    const photo = await readPhoto(path);
    expect(photo.exif.dateTimeOriginal).toBe('2024:05:06 07:08:09');
    expect(photo.exif.subSecTimeOriginal).toBe('25');
    expect(photo.exif.timestampS).toBeCloseTo(expected, 6);
    const meta = await readPhotoMetadata(path);
    expect(meta.exif).toEqual(photo.exif);
    expect([meta.width, meta.height, meta.format, meta.bitDepth]).toEqual([8, 8, 'jpeg', 8]);
  });

  it('a photo without EXIF has an empty time record', async () => {
    const path = join(dir, 'untimed.png');
    await raw8([1, 2, 3], 1, 1, 3).png().toFile(path);
    expect((await readPhoto(path)).exif).toEqual({});
  });
});

describe('readPhotoMetadata() errors and parseExifTime() robustness', () => {
  it('readPhotoMetadata() names missing, empty and non-image files', async () => {
    await expect(readPhotoMetadata(join(dir, 'absent.jpg'))).rejects.toThrow(/absent\.jpg: file not found/);
    await writeFile(join(dir, 'zero.jpg'), '');
    await expect(readPhotoMetadata(join(dir, 'zero.jpg'))).rejects.toThrow(/zero\.jpg: file is empty/);
    await writeFile(join(dir, 'words.jpg'), 'not an image at all');
    await expect(readPhotoMetadata(join(dir, 'words.jpg'))).rejects.toThrow(/words\.jpg: is not an image/);
  });
  it('parseExifTime() gives an empty record for absent or malformed EXIF instead of failing', () => {
    expect(parseExifTime(undefined)).toEqual({});
    expect(parseExifTime(Buffer.alloc(0))).toEqual({});
    expect(parseExifTime(Buffer.from('Exif\0\0garbage that is not a TIFF header'))).toEqual({});
  });
});

describe('readPhoto() input errors are InputError naming the file, with a plain message', () => {
  async function expectInputError(path: string, pattern: RegExp, options?: { maxPixels?: number }) {
    const error = await readPhoto(path, options).then(
      () => undefined,
      (e: unknown) => e,
    );
    expect(error).toBeInstanceOf(InputError);
    expect((error as InputError).file).toBe(path);
    expect((error as Error).message).toMatch(pattern);
    expect((error as Error).message).not.toMatch(/\n/);
  }

  it('missing file', async () => expectInputError(join(dir, 'nope.png'), /file not found/));
  it('a folder', async () => {
    await mkdir(join(dir, 'folder.png'), { recursive: true });
    await expectInputError(join(dir, 'folder.png'), /is a folder/);
  });
  it('empty file', async () => {
    await writeFile(join(dir, 'empty.jpg'), '');
    await expectInputError(join(dir, 'empty.jpg'), /file is empty/);
  });
  it('not an image', async () => {
    await writeFile(join(dir, 'notes.png'), 'thickness notes, not an image\n');
    await expectInputError(join(dir, 'notes.png'), /not an image/);
  });
  it('truncated JPEG', async () => {
    const bytes = await sharp({ create: { width: 64, height: 64, channels: 3, background: '#336699' } }).jpeg().toBuffer();
    await writeFile(join(dir, 'cut.jpg'), bytes.subarray(0, Math.floor(bytes.length / 2)));
    await expectInputError(join(dir, 'cut.jpg'), /truncated or corrupt/);
  });
  it('truncated PNG', async () => {
    const noisy = Uint8Array.from({ length: 64 * 64 * 3 }, (_, i) => (i * 7919) % 251);
    const bytes = await raw8(Array.from(noisy), 64, 64, 3).png().toBuffer();
    await writeFile(join(dir, 'cut.png'), bytes.subarray(0, Math.floor(bytes.length * 0.6)));
    await expectInputError(join(dir, 'cut.png'), /damaged PNG: its image data cannot be read \(cut short or corrupt\)/);
  });
  it('over the pixel limit (caller limit below the image size)', async () => {
    const path = join(dir, 'limit.png');
    await raw8(new Array(10 * 10 * 3).fill(0), 10, 10, 3).png().toFile(path);
    await expectInputError(path, /more (pixels )?than the limit of 99 pixels/, { maxPixels: 99 });
    expect((await readPhoto(path, { maxPixels: 100 })).width).toBe(10);
  });
  it('a header claiming 20000×20000 pixels is refused by the default limit before decoding', async () => {
    // Hand-made PNG with a tiny IDAT: only the header is needed to refuse it.
    const png = pngHeaderClaiming(20000, 20000);
    const path = join(dir, 'huge.png');
    await writeFile(path, png);
    await expectInputError(path, /limit of 100000000 pixels/);
    const meta = await readPhotoMetadata(path);
    expect([meta.width, meta.height]).toEqual([20000, 20000]);
  });
  it('MAX_PIXELS is 100 megapixels and a larger caller limit is refused', async () => {
    expect(MAX_PIXELS).toBe(100_000_000);
    await expect(readPhoto(join(dir, 'limit.png'), { maxPixels: MAX_PIXELS + 1 })).rejects.toThrow(RangeError);
  });
});

describe('readPhoto() sniffs the content, not the suffix', () => {
  it('a PNG named .jpg and a JPEG named .tif both read, with their true format', async () => {
    const png = join(dir, 'real-png.jpg');
    await raw8([1, 2, 3], 1, 1, 3).png().toFile(join(dir, 'real-png.png'));
    await copyFile(join(dir, 'real-png.png'), png);
    expect((await readPhoto(png)).format).toBe('png');
    const jpeg = join(dir, 'real-jpeg.tif');
    await writeFile(jpeg, await sharp({ create: { width: 4, height: 4, channels: 3, background: '#000' } }).jpeg().toBuffer());
    expect((await readPhoto(jpeg)).format).toBe('jpeg');
  });
  it('a file without suffix reads too', async () => {
    const path = join(dir, 'no-suffix');
    await raw8([1, 2, 3], 1, 1, 3).png().toFile(path);
    expect((await readPhoto(path)).width).toBe(1);
  });
});
