/**
 * Atomic file write: the bytes go to a temp file in the same folder (same file system, so the
 * final rename is atomic on POSIX), are flushed with fsync, then renamed over the target. On any
 * error the temp file is removed and the target is left as it was. While in flight the temp file is
 * registered so that an interrupt handler can remove it (./tempFiles.ts).
 */
import { open, rename, unlink } from 'node:fs/promises';
import { basename, dirname, join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { InputError } from '../cli/errors.js';
import { registerTempFile, unregisterTempFile } from './tempFiles.js';

/** Name of the temp file used while writing `path` (hidden, same folder). */
export function tempPathFor(path: string): string {
  return join(dirname(path), `.${basename(path)}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`);
}

export async function atomicWriteFile(path: string, bytes: Uint8Array): Promise<void> {
  if (typeof path !== 'string' || path.length === 0) {
    throw new TypeError(`path must be a non-empty string, received ${JSON.stringify(path)}`);
  }
  if (!(bytes instanceof Uint8Array)) {
    throw new TypeError(`bytes must be a Uint8Array or Buffer, received ${Object.prototype.toString.call(bytes)}`);
  }
  const temp = tempPathFor(path);
  registerTempFile(temp);
  try {
    const handle = await open(temp, 'wx');
    try {
      await handle.writeFile(bytes);
      await handle.sync();
    } finally {
      await handle.close();
    }
    await rename(temp, path);
  } catch (error) {
    await unlink(temp).catch(() => undefined);
    const detail = error instanceof Error ? error.message : String(error);
    throw new InputError(path, `cannot write output file (${detail})`);
  } finally {
    unregisterTempFile(temp);
  }
}
