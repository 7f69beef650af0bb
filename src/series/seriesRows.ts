/**
 * Collects the per-frame records a series has in OUT into one row per frame, in input order.
 * Only records made with the current settings count; frames without one are listed as missing.
 * A frame whose map found no film (`filmArea.found` false) keeps its row with no statistics, no
 * exposure and a film area of 0 px; a record from before film areas existed counts as film, its area the pixels
 * not excluded (from `stats.film_area_px`, else counted in its `.status.npy`).
 * This is the whole of aggregation: any run, shard or not, ends with it, so N shards plus one
 * aggregation give exactly what a single run gives.
 */
import { frameSettingsHash } from './frameSource.js';
import { readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { decodeNpy } from '../io/decodeNpy.js';
import { PixelStatus } from '../map/types.js';
import { framesDir, readFrameRecord } from './frameFiles.js';
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
  /** Share of the film area with an estimate; null for a frame without film. */
  readonly coverage: number | null;
  readonly exposure: number | null;
  readonly darkLimitNm: number | null;
  /** Pixels of the film area (0 without film); null when an old record cannot tell. Absent: unknown. */
  readonly filmAreaPx?: number | null;
  /** False when the frame's map found no film; absent or true: film. */
  readonly filmFound?: boolean;
  /** With `--spec`: the share of the inspected film area in spec, and the verdict (absent without a spec). */
  readonly inSpecFraction?: number | null;
  readonly specPass?: boolean | null;
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
    const found = record.filmArea?.found !== false;
    const inspection = (record.inspection ?? null) as { spec?: { in_spec_fraction?: unknown } | null; verdict?: { pass?: unknown } | null } | null;
    const judged = inspection?.verdict
      ? { inSpecFraction: num(inspection.spec?.in_spec_fraction), specPass: inspection.verdict.pass === true }
      : {};
    const common = { frame: frames[i].name, timeS: timesS[i], exposure: num(record.fitted?.exposure), darkLimitNm: num(record.darkLimitNm), ...judged };
    if (!found) {
      // No film: no statistics, and no exposure either (a photo-formation fit to no film means nothing).
      rows.push({
        ...common, exposure: null, meanNm: null, medianNm: null, minNm: null, maxNm: null, stdNm: null, thinFraction: null,
        thinRegions: 0, coverage: null, filmAreaPx: 0, filmFound: false,
      });
      continue;
    }
    rows.push({
      ...common,
      meanNm: num(s.mean_nm),
      medianNm: num(s.median_nm),
      minNm: num(s.min_nm),
      maxNm: num(s.max_nm),
      stdNm: num(s.std_nm),
      thinFraction: num(s.thin_fraction),
      thinRegions: num(s.thin_regions) ?? 0,
      coverage: num(s.coverage) ?? 0,
      filmAreaPx: await filmAreaPxOf(outDir, frames[i].stem, record),
      filmFound: true,
    });
  }
  return { rows, missing, stale };
}

/** The film area of a frame with film: from its record, else its pixels not excluded (old records). */
async function filmAreaPxOf(outDir: string, stem: string, record: FrameRecord): Promise<number | null> {
  const recorded = num(record.filmArea?.areaPx) ?? num((record.stats as { film_area_px?: unknown }).film_area_px);
  if (recorded !== null) return recorded;
  try {
    const npy = decodeNpy(await readFile(join(framesDir(outDir), `${stem}.status.npy`)), stem);
    if (!(npy.data instanceof Uint8Array)) return null;
    let count = 0;
    for (let p = 0; p < npy.data.length; p++) if (npy.data[p] !== PixelStatus.excluded) count++;
    return count;
  } catch {
    return null;
  }
}
