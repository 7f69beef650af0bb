/**
 * Expands the INPUT arguments of a series into an ordered list of frames: a file is taken as is,
 * a folder contributes its image files (not recursive), anything else is a glob pattern
 * (tinyglobby). Frames are sorted in natural order of their file names (then of their full
 * paths), and a file named twice is kept once.
 */
import { stat, readdir } from 'node:fs/promises';
import { basename, extname, join, resolve } from 'node:path';
import { glob } from 'tinyglobby';
import { compareNatural } from './naturalOrder.js';
import { isImageFileName } from './imageExtensions.js';
import type { FrameJob } from './types.js';
import { InputError, UsageError } from '../errors.js';
import { containerFrameJobs, containerOf, type ContainerInput } from './containerFrames.js';

export interface ExpandedInputs {
  readonly frames: FrameJob[];
  /** Inputs that matched nothing, and duplicates removed, as one-line warnings. */
  readonly warnings: string[];
  /** Set when the input is one video file or multi-page stack (./containerFrames.ts). */
  readonly container?: ContainerInput;
}

/** True when `input` uses glob syntax (*, ?, [ ], { }, a leading !). */
export function isGlobPattern(input: string): boolean {
  return /[*?[\]{}]/.test(input) || input.startsWith('!');
}

async function kindOf(path: string): Promise<'file' | 'dir' | null> {
  try {
    const info = await stat(path);
    return info.isDirectory() ? 'dir' : 'file';
  } catch {
    return null;
  }
}

/**
 * The files that INPUT arguments name, in argument order (not sorted, duplicates kept): a file as
 * is, a folder's image files (not recursive), a glob pattern's matches (tinyglobby). A plain path
 * that does not exist is an InputError; a folder or pattern that yields nothing is a warning.
 * `absolute: false` keeps the paths as the user wrote them (relative to `cwd`), for messages.
 */
export async function expandInputPaths(
  inputs: readonly string[],
  cwd: string = process.cwd(),
  options: { readonly absolute?: boolean } = {},
): Promise<{ paths: string[]; warnings: string[] }> {
  if (!Array.isArray(inputs)) throw new TypeError(`inputs must be an array of strings, received ${typeof inputs}`);
  const absolutePaths = options.absolute !== false;
  const warnings: string[] = [];
  const found: string[] = [];
  for (const input of inputs) {
    if (typeof input !== 'string' || input === '') throw new TypeError(`each input must be a non-empty string, received ${JSON.stringify(input)}`);
    const absolute = resolve(cwd, input);
    const kind = await kindOf(absolute);
    if (kind === 'file') {
      found.push(absolutePaths ? absolute : input);
    } else if (kind === 'dir') {
      // Symlinked frames count like files (the link is followed when the frame is read).
      const entries = (await readdir(absolute, { withFileTypes: true })).filter((entry) => isImageFileName(entry.name));
      const names: string[] = [];
      for (const entry of entries) {
        const path = join(absolute, entry.name);
        if (entry.isFile() || (entry.isSymbolicLink() && (await kindOf(path)) === 'file')) names.push(absolutePaths ? path : join(input, entry.name));
      }
      if (names.length === 0) warnings.push(`input folder ${input} holds no image files (.jpg, .png, .tif, .webp)`);
      found.push(...names.sort((a, b) => compareNatural(basename(a), basename(b))));
    } else if (!isGlobPattern(input)) {
      // A plain path that does not exist is a mistake, not an empty pattern: stop before any frame.
      throw new InputError(input, 'no such file or folder (give photos, folders of photos or a glob pattern)');
    } else {
      const matches = await glob(input, { cwd, absolute: absolutePaths, onlyFiles: true, expandDirectories: false });
      if (matches.length === 0) warnings.push(`input ${input} matches no file`);
      found.push(...(absolutePaths ? matches.map((m) => resolve(m)) : matches.sort((a, b) => compareNatural(basename(a), basename(b)))));
    }
  }
  return { paths: found, warnings };
}

export async function expandInputs(inputs: readonly string[], cwd: string = process.cwd()): Promise<ExpandedInputs> {
  const { paths: found, warnings } = await expandInputPaths(inputs, cwd);
  const unique = [...new Set(found)];
  // A video or a multi-page stack is a series of its own.
  for (const path of unique) {
    const container = await containerOf(path);
    if (!container) continue;
    if (unique.length > 1) {
      throw new UsageError(
        `${basename(path)} is a ${container.kind === 'video' ? 'video' : 'multi-page image stack'} of ${container.frameCount} frames: map it on its own (one video or stack per series), not with ${unique.length - 1} other input file(s)`,
      );
    }
    if (container.frameCount === 0) throw new InputError(path, 'holds no frames');
    return { frames: containerFrameJobs(container), warnings, container };
  }
  if (unique.length < found.length) warnings.push(`${found.length - unique.length} input file(s) named more than once were taken once`);
  unique.sort((a, b) => compareNatural(basename(a), basename(b)) || compareNatural(a, b));
  const byStem = new Map<string, string>();
  const frames = unique.map((path, index) => {
    const name = basename(path);
    const stem = name.slice(0, name.length - extname(name).length) || name;
    // Stems that differ only in case name one file on case-insensitive file systems (macOS, Windows).
    const clash = byStem.get(stem.toLowerCase());
    if (clash !== undefined) {
      throw new RangeError(`input frames ${clash} and ${path} share the name stem "${stem}" (names that differ only in case count as equal); per-frame outputs would collide, rename one`);
    }
    byStem.set(stem.toLowerCase(), path);
    return { index, path, name, stem };
  });
  return { frames, warnings };
}
