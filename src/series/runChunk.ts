/**
 * Maps one chunk of consecutive frames in order, each with the previous frame's map as its order
 * prior, the previous frame's fitted photo formation as the start of its fit and the previous
 * frame's pixel statuses, whose film area is the prior of this frame's (the chunk's first frame
 * without any of them). Frames already done with the same settings are skipped and their
 * stored map and fit (exact: JSON keeps every double) are read back for the next frame, so a
 * resumed run maps every frame exactly as an uninterrupted one. A failing frame is reported and
 * the next frame starts afresh.
 */
import { readFile } from 'node:fs/promises';
import { decodeNpy } from '../io/decodeNpy.js';
import { frameNpyPath, frameStatusPath, isFrameDone, readFrameRecord } from './frameFiles.js';
import { frameRecordOf, writeFrameOutputs } from './writeFrameOutputs.js';
import { frameSettingsHash } from './frameSource.js';
import type { FrameEvent, FrameJob, FrameProcessor } from './types.js';
import type { MapResult } from '../map/types.js';

export interface ChunkContext {
  readonly outDir: string;
  readonly settingsHash: string;
  /** SHA-256 of the run's data files, stored in each frame record (./frameSource.ts). */
  readonly inputFiles?: Readonly<Record<string, string>>;
  readonly previews: boolean;
  /** Size every frame must have (from the series' reference frame), or null to accept any. */
  readonly expectedSize: { readonly width: number; readonly height: number } | null;
  readonly isAborted?: () => boolean;
  readonly onFrame: (event: FrameEvent) => void;
}

/** A done frame's stored 2-D array (its map or its statuses) of the series' size, or null. */
async function storedArray<T extends Float32Array | Uint8Array>(path: string, stem: string, size: ChunkContext['expectedSize'], kind: new (n: number) => T): Promise<T | null> {
  try {
    const npy = decodeNpy(await readFile(path), stem);
    const [height, width] = npy.shape;
    if (!(npy.data instanceof kind) || npy.shape.length !== 2) return null;
    if (size && (width !== size.width || height !== size.height)) return null;
    return npy.data;
  } catch {
    return null;
  }
}

const storedMap = (outDir: string, frame: FrameJob, size: ChunkContext['expectedSize']) => storedArray(frameNpyPath(outDir, frame.stem), frame.stem, size, Float32Array);
/** The stored statuses of a done frame (its film area, the next frame's prior), or null. */
const storedStatus = (outDir: string, frame: FrameJob, size: ChunkContext['expectedSize']) => storedArray(frameStatusPath(outDir, frame.stem), frame.stem, size, Uint8Array);

function messageOf(error: unknown): string {
  return (error instanceof Error ? error.message : String(error)).replace(/\s*\n\s*/g, ' ');
}

export async function runChunk(chunk: readonly FrameJob[], processor: FrameProcessor, context: ChunkContext): Promise<void> {
  const { outDir, settingsHash, previews, expectedSize, onFrame } = context;
  const writePreviews = previews && processor.writePreviews ? processor.writePreviews.bind(processor) : null;
  let previous: { frame: FrameJob; map: Float32Array | null; fitted: MapResult['fitted'] | null; status: Uint8Array | null; stored: boolean; hash: string } | null = null;
  for (const frame of chunk) {
    if (context.isAborted?.()) return;
    // The series' settings and data files combined with the frame's own file.
    // (and the frame before it in the chunk, whose map is the prior).
    const frameHash = frameSettingsHash(settingsHash, frame, previous?.hash ?? null);
    if (await isFrameDone(outDir, frame.stem, frameHash, previews)) {
      previous = { frame, map: null, fitted: null, status: null, stored: true, hash: frameHash };
      onFrame({ index: frame.index, name: frame.name, outcome: 'skipped' });
      continue;
    }
    try {
      let prior: Float32Array | null = null;
      let previousFit: MapResult['fitted'] | null = null;
      let priorStatus: Uint8Array | null = null;
      if (previous !== null) {
        prior = previous.stored ? await storedMap(outDir, previous.frame, expectedSize) : previous.map;
        previousFit = previous.stored ? ((await readFrameRecord(outDir, previous.frame.stem))?.fitted ?? null) : previous.fitted;
        priorStatus = previous.stored ? await storedStatus(outDir, previous.frame, expectedSize) : previous.status;
      }
      const priorFrame = prior === null ? null : previous!.frame.name;
      const result = await processor.map(frame.path, prior, prior === null ? null : previousFit, prior === null ? null : priorStatus);
      if (expectedSize && (result.width !== expectedSize.width || result.height !== expectedSize.height)) {
        throw new RangeError(`size ${result.width}x${result.height} differs from the series' ${expectedSize.width}x${expectedSize.height}; skipped`);
      }
      const mappedHash = frameSettingsHash(settingsHash, frame, prior === null ? null : previous!.hash);
      const record = {
        ...frameRecordOf(frame, result, mappedHash, priorFrame),
        seriesHash: settingsHash,
        ...(frame.source ? { source: frame.source } : {}),
        ...(context.inputFiles ? { inputFiles: context.inputFiles } : {}),
      };
      await writeFrameOutputs(outDir, frame, result, record, writePreviews);
      previous = { frame, map: result.thicknessNm, fitted: result.fitted, status: result.status, stored: false, hash: mappedHash };
      onFrame({ index: frame.index, name: frame.name, outcome: 'mapped' });
    } catch (error) {
      previous = null;
      // Input errors already start with the frame's path: name the frame once.
      const text = messageOf(error);
      const message = text.startsWith(`${frame.path}: `) ? `${frame.name}: ${text.slice(frame.path.length + 2)}` : `${frame.name}: ${text}`;
      onFrame({ index: frame.index, name: frame.name, outcome: 'failed', message });
    }
  }
}
