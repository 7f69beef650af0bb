/**
 * Write failures injected into the file system calls (vitest module mock of node:fs/promises),
 * so they are tested on every machine: a full disk (ENOSPC), a denied write or read (EACCES). Tests
 * run as root, where permission bits do not stop a write, so EACCES can only be simulated here;
 * tests/hardening-output.test.ts makes the real thing with a tmpfs and a read-only mount where
 * the system allows it. Error codes are the POSIX errno names (IEEE Std 1003.1, <errno.h>).
 *
 * The map written here is of an INVENTED 24×16 wedge rendered by our own forward model.
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
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
const { writeOutputSet, recoverStagedSets } = await import('../src/io/writeOutputSet.js');
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

describe('writeOutputSet(): a set of outputs replaces the old set whole, or not at all', () => {
  const oldSet = (paths: string[]): void => {
    for (const path of paths) writeFileSync(path, `old ${path}`);
  };
  const leftovers = (): string[] => readdirSync(dir).filter((n) => n.startsWith('.lamella-staging-') || n.endsWith('.tmp'));

  it('a full disk on the third file of a re-run keeps the whole old set and leaves no staging folder', async () => {
    const paths = ['a.npy', 'a.tif', 'a.json'].map((n) => join(dir, 'set-' + n));
    oldSet(paths);
    failNextOpen('ENOSPC', 3);
    await expect(
      writeOutputSet(paths, async (staging) => {
        for (const path of paths) await atomicWriteFile(join(staging, basename(path)), Buffer.from(`new ${path}`));
      }),
    ).rejects.toThrow(new RegExp(`^${join(dir, 'set-a.json')}: cannot write output file \\(no space left on the device, ENOSPC\\)$`));
    for (const path of paths) expect(readFileSync(path, 'utf8'), path).toBe(`old ${path}`);
    expect(leftovers()).toEqual([]);
  });

  it('the interrupt clean-up during the write removes the staging folder; the old set stays whole', async () => {
    const paths = ['b.npy', 'b.json'].map((n) => join(dir, 'set-' + n));
    oldSet(paths);
    await writeOutputSet(paths, async (staging) => {
      await atomicWriteFile(join(staging, 'set-b.npy'), Buffer.from('new'));
      // What the SIGINT/SIGTERM handler calls (src/io/tempFiles.ts) before exiting:
      cleanupTempFiles();
      expect(existsSync(staging)).toBe(false);
      throw new Error('stopped');
    }).catch(() => undefined);
    for (const path of paths) expect(readFileSync(path, 'utf8')).toBe(`old ${path}`);
    expect(leftovers()).toEqual([]);
  });

  it('a complete set replaces every old member, and old members the new set lacks are removed', async () => {
    const paths = ['c.npy', 'c.json', 'c.report.html'].map((n) => join(dir, 'set-' + n));
    oldSet(paths);
    await writeOutputSet(paths, async (staging) => {
      for (const path of paths.slice(0, 2)) await atomicWriteFile(join(staging, basename(path)), Buffer.from('new'));
    });
    expect(readFileSync(paths[0], 'utf8')).toBe('new');
    expect(readFileSync(paths[1], 'utf8')).toBe('new');
    expect(existsSync(paths[2])).toBe(false);
    // After the set completes, its files are no longer the clean-up's business.
    cleanupTempFiles();
    expect(existsSync(paths[0])).toBe(true);
    expect(leftovers()).toEqual([]);
  });
});

describe('recoverStagedSets(): what a SIGKILL left is finished or dropped by the next run', () => {
  // A process id that has surely ended: a child we waited for.
  const deadPid = spawnSync(process.execPath, ['-e', '0']).pid!;

  it('an uncommitted staging folder and a stray temp file of a dead run are removed; the old set stays', () => {
    const folder = mkdtempSync(join(dir, 'killed-'));
    writeFileSync(join(folder, 'p.json'), 'old');
    const staging = join(folder, `.lamella-staging-${deadPid}-0badcafe`);
    mkdirSync(staging);
    writeFileSync(join(staging, 'p.json'), 'new, half');
    writeFileSync(join(folder, `.p.map.png.${deadPid}.deadbeef.tmp`), 'half');
    expect(recoverStagedSets(folder).sort()).toEqual([`.lamella-staging-${deadPid}-0badcafe`, `.p.map.png.${deadPid}.deadbeef.tmp`].sort());
    expect(readdirSync(folder)).toEqual(['p.json']);
    expect(readFileSync(join(folder, 'p.json'), 'utf8')).toBe('old');
  });

  it('a committed staging folder (killed part-way through the swap) is finished: the whole new set', () => {
    const folder = mkdtempSync(join(dir, 'killed-'));
    writeFileSync(join(folder, 'p.json'), 'new'); // already moved before the kill
    writeFileSync(join(folder, 'p.npy'), 'old');
    writeFileSync(join(folder, 'p.report.html'), 'old');
    const staging = join(folder, `.lamella-staging-${deadPid}-00c0ffee`);
    mkdirSync(staging);
    writeFileSync(join(staging, 'p.npy'), 'new');
    writeFileSync(join(staging, '.lamella-commit'), JSON.stringify({ replace: ['p.json', 'p.npy'], remove: ['p.report.html'] }));
    recoverStagedSets(folder);
    expect(readdirSync(folder).sort()).toEqual(['p.json', 'p.npy']);
    expect(readFileSync(join(folder, 'p.npy'), 'utf8')).toBe('new');
  });

  it('a staging folder of a run still going is left alone', () => {
    const folder = mkdtempSync(join(dir, 'live-'));
    mkdirSync(join(folder, `.lamella-staging-${process.pid}-12345678`));
    expect(recoverStagedSets(folder)).toEqual([]);
    expect(readdirSync(folder)).toEqual([`.lamella-staging-${process.pid}-12345678`]);
  });
});

describe('ensureOutputDir() with a folder it may not write', () => {
  it('EACCES on the access check → InputError "output folder is not writable"', async () => {
    inject.onAccess = 'EACCES';
    await expect(ensureOutputDir(dir)).rejects.toThrow(new RegExp(`^${dir}: output folder is not writable$`));
  });
});

describe('writeMapOutputs() on a full disk', () => {
  it('the fourth of seven files to be opened fails: the others are removed, the error names the file', async () => {
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
    // The seven are written concurrently, so which file is opened fourth depends on timing.
    expect((error as Error).message).toMatch(
      /wedge\.(thickness\.npy|confidence\.npy|status\.npy|thickness\.tif|map\.png|flags\.png|json): cannot write output file \(no space left on the device, ENOSPC\)$/,
    );
    expect(readdirSync(out)).toEqual([]);
    // And with room again, all seven are written.
    const written = await writeMapOutputs(result, 'wedge.png', out, 'wedge', { images: true, json: true, npy: true, tiff: true }, options);
    expect(readdirSync(out).sort()).toEqual(written.map((p) => p.slice(out.length + 1)).sort());
    expect(written).toHaveLength(7);
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
