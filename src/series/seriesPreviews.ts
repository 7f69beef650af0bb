/**
 * One colour range for a whole series' previews, so that a colour change between frames is a
 * thickness change: `--range MIN-MAX` when given (the workers draw every preview in it), else the
 * series' own range — from the lowest 5th to the highest 95th percentile of its frames' thickness,
 * widened to round numbers — in which previews drawn in another range are redrawn from the stored
 * maps at aggregation (each record notes the range its preview was drawn in, so a rerun redraws
 * only what changed).
 */
import { join } from 'node:path';
import { atomicWriteFile } from '../io/atomicWriteFile.js';
import { roundedRange } from '../map/mapImages.js';
import { framesDir, readFrameRecord } from './frameFiles.js';
import { frameRecordToJson } from './frameRecordJson.js';
import { storedFrame } from './lastFrameView.js';
import type { FrameJob, FrameProcessor, FrameRecord } from './types.js';

/** The series' own range from its frames' records, or null when no frame has film with estimates. */
export function seriesRangeOf(records: readonly FrameRecord[]): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const record of records) {
    if (record.filmArea?.found === false) continue;
    const { p05_nm: p05, p95_nm: p95 } = record.stats;
    if (typeof p05 === 'number' && p05 < lo) lo = p05;
    if (typeof p95 === 'number' && p95 > hi) hi = p95;
  }
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return null;
  const range = roundedRange(lo, hi);
  return [range.minNm, range.maxNm];
}

/** Redraws the previews not drawn in `rangeNm`; returns how many were redrawn. */
export async function redrawPreviews(
  outDir: string,
  frames: readonly FrameJob[],
  rangeNm: readonly [number, number],
  processor: FrameProcessor,
  isAborted: () => boolean,
): Promise<number> {
  if (!processor.renderStoredPreview) return 0;
  let redrawn = 0;
  for (const frame of frames) {
    if (isAborted()) break;
    const record = await readFrameRecord(outDir, frame.stem);
    if (!record) continue;
    const drawn = record.previewRangeNm;
    if (drawn && drawn[0] === rangeNm[0] && drawn[1] === rangeNm[1]) continue;
    const stored = await storedFrame(outDir, frame);
    if (!stored) continue;
    await processor.renderStoredPreview(stored, frame.path, framesDir(outDir), frame.stem, rangeNm);
    const updated: FrameRecord = { ...record, previewRangeNm: [rangeNm[0], rangeNm[1]] };
    await atomicWriteFile(join(framesDir(outDir), `${frame.stem}.json`), Buffer.from(`${JSON.stringify(frameRecordToJson(updated), null, 2)}\n`, 'utf8'));
    redrawn++;
  }
  return redrawn;
}
