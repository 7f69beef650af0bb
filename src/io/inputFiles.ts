/**
 * The data files a run reads besides its photos (stack and material files, light SPD, camera
 * CSV, calibration), and the checks every such read makes:
 *
 * - `regularFileProblemSync` refuses anything but a regular file before it is opened: a FIFO
 *   would block the read forever, a device would stream without end.
 * - `noteInputFile` records the file, so that the CLI can compare every file the run read with
 *   every output it is about to write (`assertNoInputOverwritten`, ./ensureOutputDir.ts) and the
 *   series can fingerprint their contents (`inputFingerprints`).
 *
 * The record is per process (a CLI run is one process); `forgetInputFiles` clears it for tests.
 */
import { statSync, type Stats } from 'node:fs';
import { resolve } from 'node:path';

export interface NotedInputFile {
  /** The path as the user or the referring file gave it. */
  readonly path: string;
  /** What the file is for, e.g. "--stack", "material file", "--calibration". */
  readonly role: string;
}

const noted = new Map<string, NotedInputFile>();

/** Records that the run reads `path` as `role` (the first role given for a path is kept). */
export function noteInputFile(path: string, role: string): void {
  const key = resolve(path);
  if (!noted.has(key)) noted.set(key, { path, role });
}

/** The data files recorded so far, in the order first read. */
export function notedInputFiles(): NotedInputFile[] {
  return [...noted.values()];
}

/** Clears the record (tests, or a library caller running several jobs in one process). */
export function forgetInputFiles(): void {
  noted.clear();
}

/** What kind of non-regular file `info` is, in plain words. */
export function describeFileKind(info: Stats): string {
  if (info.isDirectory()) return 'a folder';
  if (info.isFIFO()) return 'a named pipe (FIFO)';
  if (info.isSocket()) return 'a socket';
  if (info.isCharacterDevice() || info.isBlockDevice()) return 'a device';
  return 'not a regular file';
}

/**
 * Null when `path` (after following links) is a regular file, else what is wrong with it:
 * "file not found", "is a folder, expected a file", "is a named pipe (FIFO), expected a regular
 * file", … Never opens the file, so a FIFO cannot block.
 */
export function regularFileProblemSync(path: string): string | null {
  let info: Stats;
  try {
    info = statSync(path);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    if (code === 'ENOENT') return 'file not found';
    if (code === 'EACCES' || code === 'EPERM') return 'permission denied';
    if (code === 'ENOTDIR') return 'a part of the path is a file, not a folder';
    return `cannot be read (${code ?? String(error)})`;
  }
  if (info.isFile()) return null;
  if (info.isDirectory()) return 'is a folder, expected a file';
  return `is ${describeFileKind(info)}, expected a regular file`;
}

/**
 * A cell of a data file as shown in an error: numbers as they are, anything else only by its
 * length, so an error never echoes a file's text (a stack file may point at any file at all).
 */
export function showCell(cell: string): string {
  const text = cell.trim();
  if (text === '') return 'an empty cell';
  if (text.length <= 24 && /^[-+0-9.eE]+$|^[-+]?(Infinity|NaN)$/.test(text)) return `"${text}"`;
  return `text of ${text.length} character${text.length === 1 ? '' : 's'}`;
}

/** Why JSON.parse failed, with the position but without the text it quotes. */
export function describeJsonSyntaxError(error: unknown): string {
  const message = error instanceof Error ? error.message : String(error);
  const position = /position (\d+)/.exec(message);
  if (position) return `syntax error at character ${Number(position[1]) + 1}`;
  if (/end of (JSON|data)/i.test(message)) return 'the text ends too early';
  return 'syntax error';
}
