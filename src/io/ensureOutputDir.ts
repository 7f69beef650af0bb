/**
 * Prepares an output folder: creates it when missing, refuses a path that is a file or a folder
 * we cannot write to, and refuses any planned output that would overwrite an input file
 * (inputs are never overwritten).
 */
import { access, mkdir, stat } from 'node:fs/promises';
import { constants, statSync } from 'node:fs';
import { notedInputFiles } from './inputFiles.js';
import { dirname, resolve } from 'node:path';
import { describeWriteError } from './atomicWriteFile.js';
import { InputError, UsageError } from '../errors.js';

export interface EnsureOutputDirOptions {
  /** Input files of the run; none of them may be an output. */
  inputs?: readonly (string | RunInput)[];
  /** Output files planned for the run (absolute, or relative to the current folder). */
  outputs?: readonly string[];
}

/** An input of the run: its path and what it is for (shown when an output would replace it). */
export interface RunInput {
  readonly path: string;
  readonly role: string;
}

function identity(path: string): string | null {
  try {
    const info = statSync(path);
    return `${info.dev}:${info.ino}`;
  } catch {
    return null;
  }
}

/**
 * Throws UsageError when an output of the run is an input of the run: the same path, or the same
 * file reached another way (a symlinked folder or file, a hard link, `..`), compared by device and
 * inode after following links. Inputs are the given ones (plain paths are "input file"s) and every
 * data file the run has read so far (stack and material files, SPD, camera, calibration; see
 * ./inputFiles.ts). An output that does not exist yet cannot be an input.
 */
export function assertNoInputOverwritten(inputs: readonly (string | RunInput)[], outputs: readonly string[]): void {
  const all: RunInput[] = [...inputs.map((i) => (typeof i === 'string' ? { path: i, role: 'input file' } : i)), ...notedInputFiles()];
  const byPath = new Map<string, RunInput>();
  const byIdentity = new Map<string, RunInput>();
  for (const input of all) {
    if (!byPath.has(resolve(input.path))) byPath.set(resolve(input.path), input);
    const id = identity(input.path);
    if (id !== null && !byIdentity.has(id)) byIdentity.set(id, input);
  }
  for (const output of outputs) {
    const id = identity(output);
    const input = byPath.get(resolve(output)) ?? (id === null ? undefined : byIdentity.get(id));
    if (input) {
      const same = resolve(input.path) === resolve(output) ? `it is the ${input.role} ${input.path}` : `it is the same file as the ${input.role} ${input.path}`;
      throw new UsageError(`${output}: output would overwrite an input file (${same}); choose another output folder or name`);
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
