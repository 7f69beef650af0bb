/**
 * Writes a group of output files (one photo's maps, images, record and report) as one set.
 * Each file is written atomically on its own (./atomicWriteFile.ts); this adds the group: while
 * `write` runs the set's final paths are registered with the interrupt clean-up
 * (./tempFiles.ts), and if `write` fails they are removed. So after Ctrl-C, SIGTERM or a full
 * disk a photo's outputs are all there or none are (earlier versions of them included: they
 * were being replaced), and a rerun redoes that photo.
 */
import { unlink } from 'node:fs/promises';
import { registerTempFile, unregisterTempFile } from './tempFiles.js';

export async function writeOutputSet<T>(paths: readonly string[], write: () => Promise<T>): Promise<T> {
  for (const path of paths) registerTempFile(path);
  try {
    return await write();
  } catch (error) {
    await Promise.all(paths.map((path) => unlink(path).catch(() => undefined)));
    throw error;
  } finally {
    for (const path of paths) unregisterTempFile(path);
  }
}
