/**
 * Write failures injected into the file system calls (vitest module mock of node:fs/promises),
 * so they are tested on every machine: a full disk (ENOSPC), a denied write or read (EACCES). Tests
 * run as root, where permission bits do not stop a write, so EACCES can only be simulated here;
 * tests/hardening-output.test.ts makes the real thing with a tmpfs and a read-only mount where
 * the system allows it. Error codes are the POSIX errno names (IEEE Std 1003.1, <errno.h>).
 *
 * The map written here is of an INVENTED 24×16 wedge rendered by our own forward model.
 */
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, afterEach, describe, expect, it, vi } from 'vitest';

/** Which call to fail next: the n-th `open` from now (1 = the next one) with this errno code. */
const inject: { countdown: number; code: string | null; onAccess: string | null; onRead: string | null } = { countdown: 0, code: null, onAccess: null, onRead: null };

vi.mock('node:fs/promises', async (importOriginal) => {
  const actual = await importOriginal<typeof import('node:fs/promises')>();
  const fail = (code: string): NodeJS.ErrnoException => Object.assign(new Error(`${code}: injected failure`), { code });
  return {
    ...actual,
    open: async (...args: Parameters<typeof actual.open>) => {
      const handle = await actual.open(...args);
      if (inject.code !== null && --inject.countdown === 0) {
        const code = inject.code;
        inject.code = null;
        // The file is created, then the write fails part-way, as on a disk that fills up.
        return Object.assign(Object.create(Object.getPrototypeOf(handle)), handle, {
          writeFile: async () => {
            await handle.write(Buffer.from('partial'));
            throw fail(code);
          },
          sync: () => handle.sync(),
          close: () => handle.close(),
        });
      }
      return handle;
    },
    readFile: async (...args: Parameters<typeof actual.readFile>) => {
      if (inject.onRead !== null && String(args[0]).includes('locked')) throw fail(inject.onRead);
      return actual.readFile(...args);
    },
    access: async (...args: Parameters<typeof actual.access>) => {
      if (inject.onAccess !== null) throw fail(inject.onAccess);
      return actual.access(...args);
    },
  };
});

const { atomicWriteFile } = await import('../src/io/atomicWriteFile.js');
const { ensureOutputDir } = await import('../src/io/ensureOutputDir.js');
const { writeOutputSet } = await import('../src/io/writeOutputSet.js');
const { cleanupTempFiles } = await import('../src/io/tempFiles.js');
const { InputError } = await import('../src/cli/errors.js');

const dir = mkdtempSync(join(tmpdir(), 'lamella-hardening-writes-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
afterEach(() => {
  inject.code = null;
  inject.countdown = 0;
  inject.onAccess = null;
  inject.onRead = null;
});

function failNextOpen(code: string, nth = 1): void {
  inject.code = code;
  inject.countdown = nth;
}

describe('atomicWriteFile() when the write fails', () => {
  it.each([
    ['ENOSPC', 'no space left on the device, ENOSPC'],
    ['EACCES', 'permission denied, EACCES'],
    ['EDQUOT', 'disk quota exceeded, EDQUOT'],
  ])('%s: InputError naming the file and the cause in plain words; the old file is kept whole; no temp file', async (code, words) => {
    const target = join(dir, `keep-${code}.txt`);
    writeFileSync(target, 'the previous result');
    failNextOpen(code);
    const error = await atomicWriteFile(target, Buffer.from('a new result that will not fit')).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(InputError);
    expect((error as Error).message).toBe(`${target}: cannot write output file (${words})`);
    expect(readFileSync(target, 'utf8')).toBe('the previous result');
    expect(readdirSync(dir).filter((n) => n.endsWith('.tmp'))).toEqual([]);
  });

  it('a new file that fails leaves nothing at all', async () => {
    const target = join(dir, 'new.bin');
    failNextOpen('ENOSPC');
    await expect(atomicWriteFile(target, Buffer.alloc(100))).rejects.toThrow(/no space left/);
    expect(existsSync(target)).toBe(false);
    expect(readdirSync(dir).filter((n) => n.includes('new.bin'))).toEqual([]);
  });
});

describe('writeOutputSet(): a group of outputs is all there or none', () => {
  it('a failure on the third file removes the two written before it', async () => {
    const paths = ['a.npy', 'a.tif', 'a.json'].map((n) => join(dir, 'set-' + n));
    failNextOpen('ENOSPC', 3);
    await expect(
      writeOutputSet(paths, async () => {
        for (const path of paths) await atomicWriteFile(path, Buffer.from(path));
      }),
    ).rejects.toThrow(/set-a\.json: cannot write output file \(no space left on the device, ENOSPC\)/);
    for (const path of paths) expect(existsSync(path), path).toBe(false);
  });

  it('while the set is being written, the interrupt clean-up removes its finished files too', async () => {
    const paths = ['b.npy', 'b.json'].map((n) => join(dir, 'set-' + n));
    await writeOutputSet(paths, async () => {
      await atomicWriteFile(paths[0], Buffer.from('done'));
      // What the SIGINT/SIGTERM handler calls (src/io/tempFiles.ts) before exiting:
      cleanupTempFiles();
      expect(existsSync(paths[0])).toBe(false);
    });
    // After the set completes, its files are no longer the clean-up's business.
    await writeOutputSet(paths, async () => {
      for (const path of paths) await atomicWriteFile(path, Buffer.from('done'));
    });
    cleanupTempFiles();
    for (const path of paths) expect(existsSync(path)).toBe(true);
  });
});

describe('ensureOutputDir() with a folder it may not write', () => {
  it('EACCES on the access check → InputError "output folder is not writable"', async () => {
    inject.onAccess = 'EACCES';
    await expect(ensureOutputDir(dir)).rejects.toThrow(new RegExp(`^${dir}: output folder is not writable$`));
  });
});

describe('writeMapOutputs() on a full disk', () => {
  it('the fourth of six files to be opened fails: the others are removed, the error names the file', async () => {
    const { mapDecodedPhoto, writeMapOutputs } = await import('../src/map/mapPhoto.js');
    const { resolveStack } = await import('../src/optics/index.js');
    const { sampleField, shoot } = await import('./map-scenes.js');
    const W = 24;
    const H = 16;
    const truth = sampleField(W, H, (x, y) => 200 + 20 * x + 5 * y);
    const rgb8 = shoot(truth, W, H, { stack: 'soap-film', exposure: 6 });
    const rgb = Float32Array.from(rgb8, (v) => v / 255);
    const options = { stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000 };
    const photo = { width: W, height: H, rgb, bitDepth: 8 as const, format: 'png', isGrey: false, hadAlpha: false, orientationApplied: 1, exif: {} };
    const result = mapDecodedPhoto(photo, options, null, 'wedge.png');
    const out = mkdtempSync(join(dir, 'map-'));
    failNextOpen('ENOSPC', 4);
    const error = await writeMapOutputs(result, 'wedge.png', out, 'wedge', { images: true, json: true, npy: true, tiff: true }, options).catch((e: unknown) => e);
    // The six are written concurrently, so which file is opened fourth depends on timing.
    expect((error as Error).message).toMatch(
      /wedge\.(thickness\.npy|confidence\.npy|thickness\.tif|map\.png|flags\.png|json): cannot write output file \(no space left on the device, ENOSPC\)$/,
    );
    expect(readdirSync(out)).toEqual([]);
    // And with room again, all six are written.
    const written = await writeMapOutputs(result, 'wedge.png', out, 'wedge', { images: true, json: true, npy: true, tiff: true }, options);
    expect(readdirSync(out).sort()).toEqual(written.map((p) => p.slice(out.length + 1)).sort());
    expect(written).toHaveLength(6);
  });
});

describe('readPhoto() of a file it may not read', () => {
  it('EACCES on reading → InputError "<file>: permission denied" (root ignores permission bits, so it is injected)', async () => {
    const { readPhoto } = await import('../src/io/readPhoto.js');
    const path = join(dir, 'locked.png');
    writeFileSync(path, 'bytes that are never read');
    inject.onRead = 'EACCES';
    await expect(readPhoto(path)).rejects.toThrow(new RegExp(`^${path}: permission denied$`));
  });
});
