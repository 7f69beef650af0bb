/**
 * What a frame's result depends on besides the settings: the frame's own file, and the contents
 * of the data files the run reads (stack and material files, calibration, mask, light SPD). A
 * series resume compares these, not paths, so an edited stack file or a replaced photo is mapped
 * again (and the run says how many frames and why).
 *
 * A frame's file is fingerprinted by size, modification time and SHA-256 (FIPS 180-4) of its
 * bytes; whether it changed is decided by size and hash (a copy or `touch` with the same bytes
 * is the same photo). Data files by their SHA-256.
 */
import { sha256OfFile } from '../io/provenance.js';
import { stat } from 'node:fs/promises';
import { settingsHash } from './settingsHash.js';
import type { FrameJob, FrameRecord, FrameSource } from './types.js';


/** Size, modification time and SHA-256 of a frame's file, or null when it cannot be read. */
export async function fingerprintFrame(path: string): Promise<FrameSource | null> {
  try {
    const info = await stat(path);
    if (!info.isFile()) return null;
    return { sizeBytes: info.size, mtimeMs: Math.round(info.mtimeMs), sha256: await sha256OfFile(path) };
  } catch {
    return null;
  }
}

/** SHA-256 of each data file, keyed "role path" (e.g. "--stack file film.json"). Unreadable files hash as "unreadable". */
export async function fingerprintInputFiles(files: readonly { path: string; role: string }[]): Promise<Record<string, string>> {
  const out: Record<string, string> = {};
  for (const file of files) {
    out[`${file.role} ${file.path}`] = await sha256OfFile(file.path).catch(() => 'unreadable');
  }
  return out;
}

/**
 * The fingerprint stored as a frame record's `settingsHash`: the series' settings hash combined
 * with the frame's own file and the fingerprint of the frame whose map served as its prior (null
 * for none), so a changed frame also renews the frames after it in its chunk, as an uninterrupted
 * run would map them. Without a source and a prior (test doubles) it is the series' hash itself.
 */
export function frameSettingsHash(seriesHash: string, frame: FrameJob, priorHash: string | null): string {
  if (!frame.source && priorHash === null) return seriesHash;
  return settingsHash({ series: seriesHash, frame: frame.source ? { sizeBytes: frame.source.sizeBytes, sha256: frame.source.sha256 } : null, prior: priorHash });
}

/** Why a frame is mapped (again), or null when its stored result is current. */
export type RemapReason = 'new' | 'photo changed' | 'input files changed' | 'settings changed' | 'earlier frame changed' | 'incomplete';

/** Why the stored `record` does not match `expectedHash` (see frameSettingsHash), or null if it does. */
export function remapReason(
  record: FrameRecord | null,
  frame: FrameJob,
  expectedHash: string,
  current: { seriesHash: string; inputFiles: Readonly<Record<string, string>> },
): RemapReason | null {
  if (record === null || record.frame !== frame.name) return 'new';
  if (record.settingsHash === expectedHash) return null;
  if (frame.source && record.source && (record.source.sha256 !== frame.source.sha256 || record.source.sizeBytes !== frame.source.sizeBytes)) return 'photo changed';
  if (record.inputFiles && JSON.stringify(sortKeys(record.inputFiles)) !== JSON.stringify(sortKeys(current.inputFiles))) return 'input files changed';
  if (record.seriesHash === current.seriesHash) return 'earlier frame changed';
  return 'settings changed';
}

function sortKeys(record: Readonly<Record<string, string>>): [string, string][] {
  return Object.entries(record).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
}

/** "3 new, 2 photo changed" style counts, most frequent first. */
export function describeRemapReasons(reasons: readonly RemapReason[]): string {
  const counts = new Map<RemapReason, number>();
  for (const reason of reasons) counts.set(reason, (counts.get(reason) ?? 0) + 1);
  const words: Record<RemapReason, string> = {
    new: 'not mapped before',
    'photo changed': 'with a changed photo file',
    'input files changed': 'after a stack, material, calibration, mask or light file changed',
    'settings changed': 'with other settings',
    'earlier frame changed': 'after an earlier frame of their chunk (their order prior) changed',
    incomplete: 'with outputs missing',
  };

  return [...counts.entries()].sort((a, b) => b[1] - a[1]).map(([reason, n]) => `${n} ${words[reason]}`).join(', ');
}
