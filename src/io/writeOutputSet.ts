/**
 * Writes a group of output files (one photo's maps, images, record and report; a series'
 * `series.csv`, `series.json` and `report.html`) as one set that replaces the previous set all
 * together or not at all.
 *
 * The new files are written into a hidden staging folder beside the old ones
 * (`.lamella-staging-<pid>-<random>`, same file system), each flushed to disk. Only when every
 * file of the set is complete is the set swapped in: a commit list is written into the staging
 * folder, then each file is renamed over its old version and old members the new set does not
 * have are removed, all in one synchronous step, so a SIGINT/SIGTERM handler (which runs between
 * event-loop turns) cannot land in the middle. Until the commit list exists the old set is
 * untouched: a failed write (full disk), Ctrl-C or SIGTERM removes the staging folder and leaves
 * the whole old set. SIGKILL can leave a staging folder; the next run in that folder calls
 * `recoverStagedSets`, which removes an uncommitted one and finishes a committed one, so the
 * folder again holds exactly one whole set.
 */
import { existsSync, fsyncSync, mkdirSync, openSync, closeSync, readFileSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { basename, dirname, join, sep } from 'node:path';
import { InputError } from '../errors.js';
import { registerTempFile, unregisterTempFile } from './tempFiles.js';

export const STAGING_PREFIX = '.lamella-staging-';
const COMMIT_NAME = '.lamella-commit';

interface CommitList {
  /** Final names whose new version is in the staging folder (until moved). */
  readonly replace: string[];
  /** Final names of old members that the new set does not have. */
  readonly remove: string[];
}

function syncFolder(dir: string): void {
  try {
    const fd = openSync(dir, 'r');
    try {
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
  } catch {
    // Some file systems refuse fsync on a folder; the renames are still atomic.
  }
}

/** Moves the staged files into place and removes dropped members; safe to repeat. */
function applyCommit(staging: string, finalDir: string, list: CommitList): void {
  for (const name of list.replace) {
    const staged = join(staging, name);
    if (existsSync(staged)) renameSync(staged, join(finalDir, name));
  }
  for (const name of list.remove) rmSync(join(finalDir, name), { force: true });
  syncFolder(finalDir);
  rmSync(staging, { recursive: true, force: true });
}

/** An InputError about a staged file, told about the final file instead. */
function aboutFinalFile(error: unknown, staging: string, finalDir: string): unknown {
  if (error instanceof InputError && error.file.startsWith(staging + sep)) {
    const detail = error.message.slice(error.file.length + 2);
    return new InputError(join(finalDir, error.file.slice(staging.length + 1)), detail);
  }
  return error;
}

/**
 * Writes the set `paths` (final paths, all in one folder): `write` receives the staging folder and
 * must write each file there under its final base name. Members it does not write are removed
 * from the folder when the set is swapped in (they belonged to the old set). Returns what
 * `write` returns.
 */
export async function writeOutputSet<T>(paths: readonly string[], write: (stagingDir: string) => Promise<T>): Promise<T> {
  if (paths.length === 0) throw new TypeError('writeOutputSet: paths must name at least one file');
  const finalDir = dirname(paths[0]);
  const names = paths.map((p) => basename(p));
  for (const path of paths) {
    if (dirname(path) !== finalDir) throw new TypeError(`writeOutputSet: all files of a set must be in one folder, received ${paths[0]} and ${path}`);
  }
  const staging = join(finalDir, `${STAGING_PREFIX}${process.pid}-${randomBytes(4).toString('hex')}`);
  registerTempFile(staging);
  try {
    try {
      // The folder itself again if it is gone: a concurrent run into the same new folder whose
      // photos all failed removes it when it finds it empty (mapPhotos leaves no empty --out).
      mkdirSync(staging, { recursive: true });
    } catch (error) {
      throw new InputError(finalDir, `cannot write outputs (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
    }
    let value: T;
    try {
      value = await write(staging);
    } catch (error) {
      throw aboutFinalFile(error, staging, finalDir);
    }
    // The interrupt clean-up removes the staging folder: then there is nothing to swap in.
    if (!existsSync(staging)) throw new Error('the new outputs were removed by an interrupt before they were complete');
    // Everything is on disk: swap, in one synchronous step.
    const list: CommitList = { replace: names.filter((n) => existsSync(join(staging, n))), remove: names.filter((n) => !existsSync(join(staging, n))) };
    const commitTemp = join(staging, `${COMMIT_NAME}.tmp`);
    writeFileSync(commitTemp, JSON.stringify(list));
    const fd = openSync(commitTemp, 'r');
    try {
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
    renameSync(commitTemp, join(staging, COMMIT_NAME));
    applyCommit(staging, finalDir, list);
    return value;
  } catch (error) {
    // Not committed: the old set stays as it was.
    if (!existsSync(join(staging, COMMIT_NAME))) rmSync(staging, { recursive: true, force: true });
    throw error;
  } finally {
    unregisterTempFile(staging);
  }
}

function isAlive(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Clears what a run killed outright (SIGKILL, a power cut) left in `dir`: staging folders of
 * processes that no longer run (a committed one is finished, an uncommitted one removed) and
 * their atomic-write temp files (`.<name>.<pid>.<random>.tmp`). Returns the names it handled.
 */
export function recoverStagedSets(dir: string): string[] {
  let entries: string[];
  try {
    entries = readdirSync(dir);
  } catch {
    return [];
  }
  const handled: string[] = [];
  for (const name of entries) {
    const staging = new RegExp(`^${STAGING_PREFIX.replace(/[.]/g, '\\.')}(\\d+)-[0-9a-f]+$`).exec(name);
    const temp = /^\..+\.(\d+)\.[0-9a-f]{8}\.tmp$/.exec(name);
    const pid = Number((staging ?? temp)?.[1]);
    if (!(staging || temp) || isAlive(pid)) continue;
    const path = join(dir, name);
    if (staging && existsSync(join(path, COMMIT_NAME))) {
      try {
        applyCommit(path, dir, JSON.parse(readFileSync(join(path, COMMIT_NAME), 'utf8')) as CommitList);
      } catch {
        rmSync(path, { recursive: true, force: true });
      }
    } else {
      rmSync(path, { recursive: true, force: true });
    }
    handled.push(name);
  }
  return handled;
}
