/**
 * Atomic file write: the bytes go to a temp file in the same folder (same file system, so the
 * final rename is atomic on POSIX), are flushed with fsync, then renamed over the target. On any
 * error the temp file is removed and the target is left as it was. While in flight the temp file is
 * registered so that an interrupt handler can remove it (./tempFiles.ts).
 */
import { open, rename, unlink } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { InputError } from '../errors.js';
import { registerTempFile, unregisterTempFile } from './tempFiles.js';

/** Plain words for the usual write failures (the temp file's name means nothing to a user). */
const WRITE_ERRORS: Record<string, string> = {
  ENOSPC: 'no space left on the device',
  EDQUOT: 'disk quota exceeded',
  EROFS: 'the file system is read-only',
  EACCES: 'permission denied',
  EPERM: 'permission denied',
  ENOENT: 'the folder does not exist',
  ENOTDIR: 'a part of the path is a file, not a folder',
  EISDIR: 'the path is a folder, expected a file name',
  EBUSY: 'the path is busy or is a folder, expected a file name',
};

export function describeWriteError(error: unknown): string {
  const code = typeof error === 'object' && error !== null && 'code' in error ? String((error as { code: unknown }).code) : '';
  const plain = WRITE_ERRORS[code];
  if (plain) return `${plain}, ${code}`;
  return (error instanceof Error ? error.message : String(error)).replace(/\s*\n\s*/g, ' ');
}

/**
 * Name of the temp file used while writing `path` (hidden, same folder). Long names are cut so
 * that the temp name stays within the usual 255-byte limit of a file name whenever the final
 * name does (a 240-character photo name must not fail on its temp file).
 */
export function tempPathFor(path: string): string {
  const name = basename(path);
  const short = Buffer.byteLength(name) > 200 ? Buffer.from(name).subarray(0, 200).toString('utf8').replace(/\uFFFD+$/, '') : name;
  return join(dirname(path), `.${short}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`);
}

/**
 * Writes `bytes` to `path` atomically (see the module comment). `bytes` may be one buffer or
 * pieces written one after the other (a header and a view of an array: no copy of the array).
 */
export async function atomicWriteFile(path: string, bytes: Uint8Array | readonly Uint8Array[]): Promise<void> {
  if (typeof path !== 'string' || path.length === 0) {
    throw new TypeError(`path must be a non-empty string, received ${JSON.stringify(path)}`);
  }
  const pieces = bytes instanceof Uint8Array ? [bytes] : bytes;
  if (!Array.isArray(pieces) || !pieces.every((piece) => piece instanceof Uint8Array)) {
    throw new TypeError(`bytes must be a Uint8Array or Buffer (or an array of them), received ${Object.prototype.toString.call(bytes)}`);
  }
  const temp = tempPathFor(path);
  registerTempFile(temp);
  try {
    const handle = await open(temp, 'wx');
    try {
      // Each writeFile on the handle continues at its position and loops until all is written.
      for (const piece of pieces) await handle.writeFile(piece);
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temp, path);
  } catch (error) {
    await unlink(temp).catch(() => undefined);
    throw new InputError(path, `cannot write output file (${describeWriteError(error)})`);
  } finally {
    unregisterTempFile(temp);
  }
}
