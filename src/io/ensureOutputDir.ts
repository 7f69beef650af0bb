/**
 * Prepares an output folder: creates it when missing, refuses a path that is a file or a folder
 * we cannot write to, and refuses any planned output that would overwrite an input file
 * (inputs are never overwritten).
 */
import { access, mkdir, stat } from 'node:fs/promises';
import { constants } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { describeWriteError } from './atomicWriteFile.js';
import { InputError } from '../cli/errors.js';

export interface EnsureOutputDirOptions {
  /** Input files of the run; none of them may be an output. */
  inputs?: readonly string[];
  /** Output files planned for the run (absolute, or relative to the current folder). */
  outputs?: readonly string[];
}

/** Throws InputError if any output resolves to the same path as an input. */
export function assertNoInputOverwritten(inputs: readonly string[], outputs: readonly string[]): void {
  const inputSet = new Set(inputs.map((p) => resolve(p)));
  for (const output of outputs) {
    if (inputSet.has(resolve(output))) {
      throw new InputError(output, 'output would overwrite an input file; choose another output folder or name');
    }
  }
}

/**
 * Why a folder could not be made, in plain words. Recursive mkdir reports ENOENT even when the
 * real cause is a read-only or unwritable ancestor, so the nearest existing ancestor is examined.
 */
async function whyNotCreated(absolute: string, error: unknown): Promise<string> {
  let ancestor = dirname(absolute);
  for (;;) {
    const info = await stat(ancestor).catch(() => undefined);
    if (info) {
      if (!info.isDirectory()) return `${ancestor} is a file, not a folder`;
      const code = await access(ancestor, constants.W_OK).then(
        () => null,
        (e: NodeJS.ErrnoException) => e.code ?? 'EACCES',
      );
      return code === null ? describeWriteError(error) : `${ancestor} is not writable (${describeWriteError({ code })})`;
    }
    const parent = dirname(ancestor);
    if (parent === ancestor) return describeWriteError(error);
    ancestor = parent;
  }
}

/** Returns the absolute folder path once it exists and is writable. */
export async function ensureOutputDir(dir: string, options: EnsureOutputDirOptions = {}): Promise<string> {
  if (typeof dir !== 'string' || dir.length === 0) {
    throw new TypeError(`dir must be a non-empty string, received ${JSON.stringify(dir)}`);
  }
  const absolute = resolve(dir);
  let info;
  try {
    info = await stat(absolute);
  } catch {
    info = undefined;
  }
  if (info && !info.isDirectory()) throw new InputError(dir, 'output folder path is an existing file, expected a folder');
  if (!info) {
    try {
      await mkdir(absolute, { recursive: true });
    } catch (error) {
      throw new InputError(dir, `cannot create output folder (${await whyNotCreated(absolute, error)})`);
    }
  }
  try {
    await access(absolute, constants.W_OK);
  } catch {
    throw new InputError(dir, 'output folder is not writable');
  }
  assertNoInputOverwritten(options.inputs ?? [], options.outputs ?? []);
  return absolute;
}
