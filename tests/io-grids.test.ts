/**
 * Grid files: NumPy .npy and 32-bit float TIFF, and readThicknessGrid().
 *
 * .npy layout checked against the format description in NumPy's documentation
 * (numpy.lib.format, "Format Version 1.0"; NEP 1, R. Kern 2007): magic \x93NUMPY, version 1.0,
 * uint16 little-endian header length, Python-literal dict header ending in '\n', data offset a
 * multiple of 64 (NumPy ≥ 1.14; NEP 1 asked for 16, which 64 also meets). The parser used for the
 * check is written here, independently of src/io. If python3 with NumPy is present, NumPy itself
 * reads our file and writes files we read; otherwise those tests are skipped with the reason.
 *
 * Float TIFF checked against TIFF Revision 6.0 (Adobe 1992) tags, and read back by the image
 * codec (libvips/libtiff), an implementation independent of ours.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { execFileSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { deflateSync } from 'node:zlib';
import sharp from 'sharp';
import {
  decodeFloatTiff,
  decodeNpy,
  encodeFloatTiff,
  encodeNpy,
  readFloatTiff,
  readNpy,
  readThicknessGrid,
  writeFloatTiff,
  writeNpy,
} from '../src/io/index.js';
import { InputError } from '../src/cli/errors.js';

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-io-grid-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

/** Minimal independent .npy v1.0 reader for little-endian float32 (written from the spec). */
function parseNpyF4(bytes: Buffer): { header: string; dataOffset: number; shape: number[]; values: number[] } {
  expect([...bytes.subarray(0, 6)]).toEqual([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]);
  expect([bytes[6], bytes[7]]).toEqual([1, 0]);
  const headerLength = bytes[8] + 256 * bytes[9];
  const header = bytes.subarray(10, 10 + headerLength).toString('latin1');
  const dataOffset = 10 + headerLength;
  const shapeText = /'shape': \(([^)]*)\)/.exec(header)![1];
  const shape = shapeText.split(',').map((s) => s.trim()).filter(Boolean).map(Number);
  const values: number[] = [];
  for (let o = dataOffset; o < bytes.length; o += 4) values.push(bytes.readFloatLE(o));
  return { header, dataOffset, shape, values };
}

function numpyAvailable(): boolean {
  try {
    execFileSync('python3', ['-c', 'import numpy'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}
const HAS_NUMPY = numpyAvailable();

describe('encodeNpy()/writeNpy() follow the .npy 1.0 format', () => {
  const values = Float32Array.from([0, 1.5, -2.25, 1e-30, 3.4e38, NaN]);

  it('header, 64-byte alignment and little-endian float32 data (independent parser)', () => {
    const bytes = encodeNpy(values, [2, 3]);
    const parsed = parseNpyF4(bytes);
    expect(parsed.header).toMatch(/^\{'descr': '<f4', 'fortran_order': False, 'shape': \(2, 3\), \} *\n$/);
    expect(parsed.dataOffset % 64).toBe(0);
    expect(parsed.shape).toEqual([2, 3]);
    expect(parsed.values.slice(0, 5)).toEqual(Array.from(values.slice(0, 5)));
    expect(Number.isNaN(parsed.values[5])).toBe(true);
    expect(bytes.length).toBe(parsed.dataOffset + 6 * 4);
  });

  it('one-dimensional shape is written as a Python 1-tuple "(n,)"', () => {
    expect(parseNpyF4(encodeNpy(Float32Array.from([1, 2]), [2])).header).toContain("'shape': (2,)");
  });

  it('refuses a shape that does not match the data', () => {
    expect(() => encodeNpy(values, [4, 2])).toThrow(/shape \[4, 2\] holds 8 elements but data has 6/);
    expect(() => encodeNpy(values, [2, -3])).toThrow(RangeError);
    expect(() => encodeNpy([1, 2] as never, [2])).toThrow(TypeError);
  });

  it('round trip through a file for float32, float64 and uint8', async () => {
    const cases = [
      { data: values, dtype: '<f4' },
      { data: Float64Array.from([Math.PI, -1e300, 5e-324]), dtype: '<f8' },
      { data: Uint8Array.from([0, 7, 255]), dtype: '|u1' },
    ];
    for (const { data, dtype } of cases) {
      const path = join(dir, `rt-${dtype.replace(/\W/g, '')}.npy`);
      await writeNpy(path, data, [data.length]);
      const back = await readNpy(path);
      expect(back.dtype).toBe(dtype);
      expect(back.shape).toEqual([data.length]);
      expect(back.data.constructor).toBe(data.constructor);
      expect(Array.from(back.data)).toEqual(Array.from(data));
    }
  });
});

describe('decodeNpy() reads other writers\' variants', () => {
  function handMade(header: string, body: Buffer, version = 1): Buffer {
    const pre = version === 1 ? 10 : 12;
    const padded = header + ' '.repeat((64 - ((pre + header.length + 1) % 64)) % 64) + '\n';
    const out = Buffer.alloc(pre + padded.length);
    out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, version, 0]);
    if (version === 1) out.writeUInt16LE(padded.length, 8);
    else out.writeUInt32LE(padded.length, 8);
    out.write(padded, pre, 'latin1');
    return Buffer.concat([out, body]);
  }

  it('big-endian float64, Fortran order (column-major) reordered to C order, version 2.0', () => {
    // Matrix [[1, 2, 3], [4, 5, 6]] stored column-major: 1 4 2 5 3 6.
    const body = Buffer.alloc(6 * 8);
    [1, 4, 2, 5, 3, 6].forEach((v, i) => body.writeDoubleBE(v, i * 8));
    const array = decodeNpy(handMade("{'descr': '>f8', 'fortran_order': True, 'shape': (2, 3), }", body, 2));
    expect(array.shape).toEqual([2, 3]);
    expect(Array.from(array.data)).toEqual([1, 2, 3, 4, 5, 6]);
  });

  it('errors name the file and say what is wrong', () => {
    expect(() => decodeNpy(Buffer.from('not npy at all'), 'a.npy')).toThrow(/a\.npy: not a NumPy \.npy file/);
    expect(() => decodeNpy(handMade("{'descr': '<c8', 'fortran_order': False, 'shape': (1,), }", Buffer.alloc(8)), 'c.npy')).toThrow(/unsupported \.npy element type '<c8'/);
    expect(() => decodeNpy(handMade("{'descr': '<f4', 'fortran_order': False, 'shape': (10,), }", Buffer.alloc(8)), 't.npy')).toThrow(InputError);
    expect(() => decodeNpy(handMade("{'descr': '<f4', 'fortran_order': False, 'shape': (10,), }", Buffer.alloc(8)), 't.npy')).toThrow(/truncated \.npy data/);
  });
});

describe.skipIf(!HAS_NUMPY)('NumPy interoperability (runs only where python3 can import numpy; no PyPI access here, so it is not installed by the tests)', () => {
  it('NumPy loads our file with the same dtype, shape and values', async () => {
    const path = join(dir, 'for-numpy.npy');
    await writeNpy(path, Float32Array.from([1.25, -3.5, 1e-7, 6.0e4, 0, 42]), [3, 2]);
    const out = execFileSync('python3', ['-c', `import numpy as n, json; a = n.load(${JSON.stringify(path)}); print(json.dumps([a.dtype.str, list(a.shape), a.ravel().astype(float).tolist(), bool(a.flags['C_CONTIGUOUS'])]))`]).toString();
    const [dtype, shape, values, cOrder] = JSON.parse(out);
    expect(dtype).toBe('<f4');
    expect(shape).toEqual([3, 2]);
    expect(values).toEqual(Array.from(Float32Array.from([1.25, -3.5, 1e-7, 6.0e4, 0, 42])));
    expect(cOrder).toBe(true);
  });

  it('we read files NumPy wrote: float64 C order and float32 Fortran order', async () => {
    const c = join(dir, 'np-c.npy');
    const f = join(dir, 'np-f.npy');
    execFileSync('python3', ['-c', `import numpy as n; a = n.arange(12, dtype='<f8').reshape(3, 4) / 8; n.save(${JSON.stringify(c)}, a); n.save(${JSON.stringify(f)}, n.asfortranarray(a.astype('<f4')))`]);
    const fromC = await readNpy(c);
    const fromF = await readNpy(f);
    const expected = Array.from({ length: 12 }, (_, i) => i / 8);
    expect([fromC.dtype, fromC.shape]).toEqual(['<f8', [3, 4]]);
    expect(Array.from(fromC.data)).toEqual(expected);
    expect(fromF.dtype).toBe('<f4');
    expect(fromF.shape).toEqual([3, 4]);
    expect(Array.from(fromF.data)).toEqual(expected);
  });
});

describe('writeFloatTiff()/readFloatTiff() 32-bit float single-channel TIFF', () => {
  const width = 5;
  const height = 3;
  const values = Float32Array.from({ length: width * height }, (_, i) => (i - 7) * 123.456);
  values[3] = NaN;
  values[4] = Infinity;
  values[5] = 1e-40; // subnormal in float32

  it('round trip keeps every value bit for bit (NaN, infinity, subnormal included)', async () => {
    const path = join(dir, 'grid.tif');
    await writeFloatTiff(path, values, width, height);
    const back = await readFloatTiff(path);
    expect([back.width, back.height]).toEqual([width, height]);
    expect(Buffer.from(back.data.buffer)).toEqual(Buffer.from(values.buffer));
  });

  it('the image codec (libtiff) sees a 1-channel float image and reads the same values', async () => {
    const path = join(dir, 'grid-codec.tif');
    const finite = Float32Array.from({ length: width * height }, (_, i) => (i - 7) * 0.5);
    await writeFloatTiff(path, finite, width, height);
    const meta = await sharp(path).metadata();
    expect([meta.format, meta.width, meta.height, meta.channels, meta.depth, meta.bitsPerSample]).toEqual(['tiff', width, height, 1, 'float', 32]);
    const raw = await sharp(path).extractChannel(0).raw({ depth: 'float' }).toBuffer();
    expect(Array.from(new Float32Array(raw.buffer, raw.byteOffset, raw.length / 4))).toEqual(Array.from(finite));
  });

  it('tags: SampleFormat 3 and BitsPerSample 32 (TIFF 6.0 §19 and §3)', () => {
    const bytes = encodeFloatTiff(values, width, height);
    const count = bytes.readUInt16LE(8);
    const tags = new Map<number, number>();
    for (let i = 0; i < count; i++) tags.set(bytes.readUInt16LE(10 + i * 12), bytes.readUInt16LE(10 + i * 12 + 8));
    expect(tags.get(339)).toBe(3);
    expect(tags.get(258)).toBe(32);
    expect(tags.get(259)).toBe(1);
    const sorted = [...tags.keys()];
    expect(sorted).toEqual([...sorted].sort((a, b) => a - b));
  });

  it('a deflate-compressed float TIFF (Compression 8) is read through the codec', async () => {
    // Hand-made: same layout as ours but strip compressed with zlib (Adobe Deflate, Compression 8,
    // Adobe "TIFF Technical Note", Photoshop TIFF spec supplement 2002).
    const plain = encodeFloatTiff(values, width, height);
    const dataOffset = plain.length - values.byteLength;
    const strip = deflateSync(plain.subarray(dataOffset));
    const out = Buffer.concat([plain.subarray(0, dataOffset), strip]);
    const count = out.readUInt16LE(8);
    for (let i = 0; i < count; i++) {
      const at = 10 + i * 12;
      const tag = out.readUInt16LE(at);
      if (tag === 259) out.writeUInt16LE(8, at + 8);
      if (tag === 279) out.writeUInt32LE(strip.length, at + 8);
    }
    const path = join(dir, 'deflate.tif');
    await writeFile(path, out);
    expect(() => decodeFloatTiff(out, path)).toThrow(/compressed float TIFF \(Compression 8\)/);
    const back = await readFloatTiff(path);
    expect(Buffer.from(back.data.buffer)).toEqual(Buffer.from(values.buffer));
  });

  it('refuses non-float TIFFs and truncated files with the file name', async () => {
    const path16 = join(dir, 'int16.tif');
    await sharp(Uint16Array.from([1, 2]), { raw: { width: 2, height: 1, channels: 1 } }).toColourspace('grey16').tiff({ compression: 'none' }).toFile(path16);
    await expect(readFloatTiff(path16)).rejects.toThrow(/int16\.tif: expected a 32-bit floating-point TIFF/);
    const cut = join(dir, 'cut.tif');
    await writeFile(cut, encodeFloatTiff(values, width, height).subarray(0, 150));
    await expect(readFloatTiff(cut)).rejects.toThrow(/cut\.tif: truncated TIFF/);
  });

  it('refuses a size that does not match the data', () => {
    expect(() => encodeFloatTiff(values, 4, 4)).toThrow(/data must hold width × height = 16 values, received 15/);
  });
});

describe('readThicknessGrid() reads .npy, float TIFF and scaled 16-bit PNG by content', () => {
  const width = 4;
  const height = 2;
  const thicknessNm = Float32Array.from([0, 100, 250.5, 1000, NaN, 12.25, 3000, 42]);

  it('.npy (2-D), even when named .dat', async () => {
    const path = join(dir, 'grid.dat');
    await writeNpy(path, thicknessNm, [height, width]);
    const grid = await readThicknessGrid(path);
    expect([grid.width, grid.height]).toEqual([width, height]);
    expect(Buffer.from(grid.data.buffer)).toEqual(Buffer.from(thicknessNm.buffer));
  });

  it('float64 .npy is converted to float32', async () => {
    const path = join(dir, 'grid64.npy');
    await writeNpy(path, Float64Array.from([1.5, 2.5]), [1, 2]);
    const grid = await readThicknessGrid(path);
    expect(grid.data).toBeInstanceOf(Float32Array);
    expect(Array.from(grid.data)).toEqual([1.5, 2.5]);
  });

  it('.npy with a 1-D shape is refused', async () => {
    const path = join(dir, 'line.npy');
    await writeNpy(path, Float32Array.from([1, 2, 3]), [3]);
    await expect(readThicknessGrid(path)).rejects.toThrow(/expected a 2-D array \(height, width\), received shape \(3\)/);
  });

  it('float TIFF', async () => {
    const path = join(dir, 'grid2.tif');
    await writeFloatTiff(path, thicknessNm, width, height);
    const grid = await readThicknessGrid(path);
    expect(Buffer.from(grid.data.buffer)).toEqual(Buffer.from(thicknessNm.buffer));
  });

  it('16-bit PNG needs pngScaleNm and is multiplied by it', async () => {
    const path = join(dir, 'grid16.png');
    const counts = Uint16Array.from([0, 1000, 2505, 10000, 65535, 123, 30000, 420]);
    await sharp(counts, { raw: { width, height, channels: 1 } }).toColourspace('grey16').png().toFile(path);
    await expect(readThicknessGrid(path)).rejects.toThrow(/need a scale in nm per count/);
    const grid = await readThicknessGrid(path, { pngScaleNm: 0.1 });
    expect(Array.from(grid.data)).toEqual(Array.from(counts).map((c) => Math.fround(c * 0.1)));
  });

  it('an 8-bit photo is not a thickness grid', async () => {
    const path = join(dir, 'photo.png');
    await sharp(Uint8Array.from([1, 2, 3]), { raw: { width: 1, height: 1, channels: 3 } }).png().toFile(path);
    await expect(readThicknessGrid(path, { pngScaleNm: 1 })).rejects.toThrow(/expected a \.npy, 32-bit float TIFF or 16-bit greyscale PNG\/TIFF grid/);
  });

  it('pngScaleNm must be positive and finite', async () => {
    await expect(readThicknessGrid(join(dir, 'grid16.png'), { pngScaleNm: -1 })).rejects.toThrow(RangeError);
  });
});

describe('typed views on codec buffers', () => {
  it('uint16View()/float32View() copy when the byte offset is not aligned, and view otherwise', async () => {
    const { uint16View, float32View } = await import('../src/io/typedView.js');
    const backing = new ArrayBuffer(9);
    const odd = Buffer.from(backing, 1, 8);
    odd.writeUInt16LE(513, 0);
    odd.writeFloatLE(1.5, 4);
    expect(uint16View(odd)[0]).toBe(513);
    expect(float32View(odd)[1]).toBe(1.5);
    const aligned = Buffer.from(new ArrayBuffer(8));
    expect(float32View(aligned).buffer).toBe(aligned.buffer);
  });
});
