/**
 * Where a series keeps its per-frame results inside OUT, and when a frame counts as done.
 * Layout: `OUT/frames/<stem>.json` (FrameRecord, written last), `<stem>.thickness.npy`, and with
 * previews the images the processor writes (`<stem>.map.png`, `<stem>.flags.png`). Work in
 * progress lives in `OUT/frames/.partial-<stem>-<pid>-<thread>/` until it is moved into place.
 */
import { readFile, readdir, rm, access } from 'node:fs/promises';
import { join } from 'node:path';
import type { FrameRecord } from './types.js';

export const PARTIAL_PREFIX = '.partial-';
export const PREVIEW_SUFFIXES = ['.map.png', '.flags.png'] as const;

export function framesDir(outDir: string): string {
  return join(outDir, 'frames');
}

export function frameJsonPath(outDir: string, stem: string): string {
  return join(framesDir(outDir), `${stem}.json`);
}

export function frameNpyPath(outDir: string, stem: string): string {
  return join(framesDir(outDir), `${stem}.thickness.npy`);
}

async function exists(path: string): Promise<boolean> {
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
    const record = JSON.parse(text) as FrameRecord;
    return record && record.format === 'lamella-series-frame' ? record : null;
  } catch {
    return null;
  }
}

/** True when the frame's record has `hash` and its map (and, if asked, previews) are present. */
export async function isFrameDone(outDir: string, stem: string, hash: string, previews: boolean): Promise<boolean> {
  const record = await readFrameRecord(outDir, stem);
  if (record === null || record.settingsHash !== hash) return false;
  if (!(await exists(frameNpyPath(outDir, stem)))) return false;
  if (previews) {
    for (const suffix of PREVIEW_SUFFIXES) if (!(await exists(join(framesDir(outDir), `${stem}${suffix}`)))) return false;
  }
  return true;
}

/**
 * Removes work left by an interrupted run: `.partial-*` folders, and outputs of a stem whose
 * record is missing (a frame cut off between moving its map and its record into place).
 */
export async function removePartialFrames(outDir: string): Promise<string[]> {
  const dir = framesDir(outDir);
  let names: string[];
  try {
    names = await readdir(dir);
  } catch {
    return [];
  }
  const removed: string[] = [];
  const records = new Set(names.filter((n) => n.endsWith('.json')).map((n) => n.slice(0, -5)));
  for (const name of names) {
    const orphan = name.endsWith('.thickness.npy') && !records.has(name.slice(0, -'.thickness.npy'.length));
    const orphanPreview = PREVIEW_SUFFIXES.some((s) => name.endsWith(s) && !records.has(name.slice(0, -s.length)));
    if (name.startsWith(PARTIAL_PREFIX) || orphan || orphanPreview) {
      await rm(join(dir, name), { recursive: true, force: true });
      removed.push(name);
    }
  }
  return removed;
}
