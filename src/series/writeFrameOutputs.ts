/**
 * Writes one frame's results so that a reader never sees a partial frame: everything goes to a
 * private `.partial-…` folder first, then each file is renamed into `frames/` (atomic on one
 * file system, POSIX rename(2)), the record last. An interrupted write leaves only the partial
 * folder, which `removePartialFrames` deletes.
 */
import { mkdir, readdir, rename, rm, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { threadId } from 'node:worker_threads';
import type { MapResult } from '../map/types.js';
import { LAMELLA_VERSION } from '../version.js';
import { npyParts } from '../io/encodeNpy.js';
import { describeWriteError } from '../io/atomicWriteFile.js';
import { framesDir, partialDirName } from './frameFiles.js';
import { frameRecordToJson } from './frameRecordJson.js';
import type { FrameJob, FrameProcessor, FrameRecord } from './types.js';

export function frameRecordOf(frame: FrameJob, result: MapResult, hash: string, priorFrame: string | null): FrameRecord {
  return {
    format: 'lamella-series-frame',
    version: 1,
    lamella_version: LAMELLA_VERSION,
    frame: frame.name,
    stem: frame.stem,
    settingsHash: hash,
    width: result.width,
    height: result.height,
    priorFrame,
    stats: result.stats,
    fitted: result.fitted,
    darkLimitNm: result.darkLimitNm,
    thinRegions: result.thinRegions,
    warnings: [...result.warnings],
    ...(result.filmArea ? { filmArea: result.filmArea } : {}),
    exposureField: result.exposureField ?? null,
    lightEvenness: result.lightEvenness ?? null,
    fitQuality: result.fitQuality ?? null,
    ...('inspection' in result && result.inspection ? { inspection: result.inspection as Record<string, unknown> } : {}),
  };
}

export async function writeFrameOutputs(
  outDir: string,
  frame: FrameJob,
  result: MapResult,
  record: FrameRecord,
  previews: FrameProcessor['writePreviews'] | null,
): Promise<void> {
  const dir = framesDir(outDir);
  const staging = join(dir, partialDirName(frame.stem, process.pid, threadId));
  await rm(staging, { recursive: true, force: true });
  await mkdir(staging, { recursive: true });
  try {
    await writeFile(join(staging, `${frame.stem}.thickness.npy`), npyParts(result.thicknessNm, [result.height, result.width]));
    await writeFile(join(staging, `${frame.stem}.status.npy`), npyParts(result.status, [result.height, result.width]));
    await writeFile(join(staging, `${frame.stem}.confidence.npy`), npyParts(result.confidence, [result.height, result.width]));
    const drawn = previews ? ((await previews(result, frame.path, staging, frame.stem)) as { rangeNm?: [number, number] } | undefined) : undefined;
    const recordName = `${frame.stem}.json`;
    const full = drawn?.rangeNm ? { ...record, previewRangeNm: drawn.rangeNm } : record;
    await writeFile(join(staging, recordName), `${JSON.stringify(frameRecordToJson(full), null, 2)}\n`);
    const names = (await readdir(staging)).filter((n) => n !== recordName);
    for (const name of names) await rename(join(staging, name), join(dir, name));
    await rename(join(staging, recordName), join(dir, recordName));
  } catch (error) {
    // The caller prefixes the frame's name; say where and why in plain words (e.g. a full disk).
    throw new Error(`cannot write its outputs in ${dir} (${describeWriteError(error)})`);
  } finally {
    await rm(staging, { recursive: true, force: true });
  }
}
