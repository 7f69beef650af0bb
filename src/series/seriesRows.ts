/**
 * Collects the per-frame records a series has in OUT into one row per frame, in input order.
 * Only records made with the current settings count; frames without one are listed as missing.
 * This is the whole of aggregation: any run, shard or not, ends with it, so N shards plus one
 * aggregation give exactly what a single run gives.
 */
import { frameSettingsHash } from './frameSource.js';
import { readFrameRecord } from './frameFiles.js';
import type { FrameJob, FrameRecord } from './types.js';

export interface SeriesRow {
  readonly frame: string;
  readonly timeS: number;
  readonly meanNm: number | null;
  readonly medianNm: number | null;
  readonly minNm: number | null;
  readonly maxNm: number | null;
  readonly stdNm: number | null;
  readonly thinFraction: number | null;
  readonly thinRegions: number;
  readonly coverage: number;
  readonly exposure: number | null;
  readonly darkLimitNm: number | null;
}

export interface CollectedRows {
  readonly rows: SeriesRow[];
  /** Frames with no record made with the current settings. */
  readonly missing: string[];
  /** Of those, frames whose record was made with other settings. */
  readonly stale: string[];
}

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

export async function collectSeriesRows(outDir: string, frames: readonly FrameJob[], timesS: readonly number[], settingsHash: string): Promise<CollectedRows> {
  if (timesS.length !== frames.length) throw new RangeError(`timesS must have one time per frame (${frames.length}), received ${timesS.length}`);
  const rows: SeriesRow[] = [];
  const missing: string[] = [];
  const stale: string[] = [];
  const records = new Map<string, FrameRecord | null>();
  for (const frame of frames) records.set(frame.name, await readFrameRecord(outDir, frame.stem));
  for (let i = 0; i < frames.length; i++) {
    const record = records.get(frames[i].name) ?? null;
    // Current when made with these settings, from this photo file, after this prior.
    const priorHash = record?.priorFrame ? (records.get(record.priorFrame)?.settingsHash ?? 'missing') : null;
    if (record === null || record.settingsHash !== frameSettingsHash(settingsHash, frames[i], priorHash) || record.frame !== frames[i].name) {
      missing.push(frames[i].name);
      if (record !== null) stale.push(frames[i].name);
      continue;
    }
    const s = record.stats;
    rows.push({
      frame: frames[i].name,
      timeS: timesS[i],
      meanNm: num(s.mean_nm),
      medianNm: num(s.median_nm),
      minNm: num(s.min_nm),
      maxNm: num(s.max_nm),
      stdNm: num(s.std_nm),
      thinFraction: num(s.thin_fraction),
      thinRegions: num(s.thin_regions) ?? 0,
      coverage: num(s.coverage) ?? 0,
      exposure: num(record.fitted?.exposure),
      darkLimitNm: num(record.darkLimitNm),
    });
  }
  return { rows, missing, stale };
}
