/**
 * Reads an input file into memory with plain, file-naming errors (InputError) for the usual
 * failures: missing, a folder, empty, unreadable. Content is sniffed later by the decoder, so the
 * suffix plays no part.
 */
import type { Stats } from 'node:fs';
import { readFile, stat } from 'node:fs/promises';
import { InputError } from '../errors.js';

function codeOf(error: unknown): string | undefined {
  return typeof error === 'object' && error !== null && 'code' in error ? String((error as { code: unknown }).code) : undefined;
}

/** Turns a file-system error into an InputError naming `path`. */
export function fileSystemInputError(path: string, error: unknown): InputError {
  const code = codeOf(error);
  if (code === 'ENOENT') return new InputError(path, 'file not found');
  if (code === 'EISDIR') return new InputError(path, 'is a folder, expected a file');
  if (code === 'EACCES' || code === 'EPERM') return new InputError(path, 'permission denied');
  const detail = error instanceof Error ? error.message : String(error);
  return new InputError(path, `cannot be read (${detail})`);
}

/**
 * Checks that `path` names a readable, non-empty regular file and returns its stats; throws
 * InputError (missing, a folder, not a regular file, empty) or TypeError for a bad argument.
 */
export async function checkInputFile(path: string): Promise<Stats> {
  if (typeof path !== 'string' || path.length === 0) {
    throw new TypeError(`path must be a non-empty string, received ${JSON.stringify(path)}`);
  }
  let info: Stats;
  try {
    info = await stat(path);
  } catch (error) {
    throw fileSystemInputError(path, error);
  }
  if (info.isDirectory()) throw new InputError(path, 'is a folder, expected a file');
  if (!info.isFile()) throw new InputError(path, 'is not a regular file');
  if (info.size === 0) throw new InputError(path, 'file is empty (0 bytes)');
  return info;
}

/** Returns the bytes of `path`; throws InputError if it is missing, a folder, empty or unreadable. */
export async function readInputFile(path: string): Promise<Buffer> {
  await checkInputFile(path);
  try {
    return await readFile(path);
  } catch (error) {
    throw fileSystemInputError(path, error);
  }
}
