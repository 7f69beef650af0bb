/**
 * Where a series keeps its per-frame results inside OUT, and when a frame counts as done.
 * Layout: `OUT/frames/<stem>.json` (FrameRecord, written last), `<stem>.thickness.npy` (float32 nm,
 * NaN = no estimate), `<stem>.status.npy` (uint8 PixelStatus codes, src/map/types.ts),
 * `<stem>.confidence.npy` (float32 0..1), and with
 * previews the images the processor writes (`<stem>.map.png`, `<stem>.flags.png`). Work in
 * progress lives in `OUT/frames/.partial-<pid>-<thread>-<stem>/` until it is moved into place.
 */
import { readFile, readdir, rm, access } from 'node:fs/promises';
import { join } from 'node:path';
import type { FrameRecord } from './types.js';
import { frameRecordFromJson } from './frameRecordJson.js';

export const PARTIAL_PREFIX = '.partial-';
export const PREVIEW_SUFFIXES = ['.map.png', '.flags.png'] as const;

export function framesDir(outDir: string): string {
  return join(outDir, 'frames');
}

export function frameJsonPath(outDir: string, stem: string): string {
  return join(framesDir(outDir), `${stem}.json`);
}

export function frameNpyPath(outDir: string, stem: string, what: 'thickness' | 'status' | 'confidence' = 'thickness'): string {
  return join(framesDir(outDir), `${stem}.${what}.npy`);
}

/** Whether a path can be reached (a file or folder). */
export async function exists(path: string): Promise<boolean> {
  try {
    await access(path);
    return true;
  } catch {
    return false;
  }
}

/** The frame's record if it exists and parses, else null. */
export async function readFrameRecord(outDir: string, stem: string): Promise<FrameRecord | null> {
  let text: string;
  try {
    text = await readFile(frameJsonPath(outDir, stem), 'utf8');
  } catch {
    return null;
  }
  try {
    return frameRecordFromJson(JSON.parse(text));
  } catch {
    return null;
  }
}

/** True when the frame's record has `hash` and its map (and, if asked, previews) are present. */
export async function isFrameDone(outDir: string, stem: string, hash: string, previews: boolean): Promise<boolean> {
  const record = await readFrameRecord(outDir, stem);
  if (record === null || record.settingsHash !== hash) return false;
  if (!(await exists(frameNpyPath(outDir, stem)))) return false;
  // The statuses carry the frame's film area, the next frame's prior (runChunk.ts).
  if (!(await exists(frameNpyPath(outDir, stem, 'status')))) return false;
  if (previews) {
    for (const suffix of PREVIEW_SUFFIXES) if (!(await exists(join(framesDir(outDir), `${stem}${suffix}`)))) return false;
  }
  return true;
}

/** Name of the private folder a thread fills with one frame's outputs before moving them. */
export function partialDirName(stem: string, pid: number, thread: number): string {
  return `${PARTIAL_PREFIX}${pid}-${thread}-${stem}`;
}

/** The stem a partial folder belongs to, or null for other names. */
function stemOfPartial(name: string): string | null {
  const match = /^\.partial-\d+-\d+-(.+)$/.exec(name);
  return match ? match[1] : null;
}

/**
 * Removes work left by an interrupted run for the given stems only: their `.partial-…` folders,
 * and outputs of a stem whose record is missing (a frame cut off between moving its map and its
 * record into place). Limited to `stems` because shards running at the same time share OUT and
 * each frame belongs to exactly one shard: a run never touches another run's frames.
 */
export async function removePartialFrames(outDir: string, stems: ReadonlySet<string>): Promise<string[]> {
  const dir = framesDir(outDir);
  let names: string[];
  try {
    names = await readdir(dir);
  } catch {
    return [];
  }
  const removed: string[] = [];
  const records = new Set(names.filter((n) => n.endsWith('.json')).map((n) => n.slice(0, -5)));
  const ownOrphan = (name: string, suffix: string): boolean => {
    if (!name.endsWith(suffix)) return false;
    const stem = name.slice(0, -suffix.length);
    return stems.has(stem) && !records.has(stem);
  };
  for (const name of names) {
    const partialStem = stemOfPartial(name);
    const partial = partialStem !== null && stems.has(partialStem);
    if (partial || ownOrphan(name, '.thickness.npy') || ownOrphan(name, '.status.npy') || PREVIEW_SUFFIXES.some((s) => ownOrphan(name, s))) {
      await rm(join(dir, name), { recursive: true, force: true });
      removed.push(name);
    }
  }
  return removed;
}
