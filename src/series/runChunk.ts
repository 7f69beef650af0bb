/**
 * Maps one chunk of consecutive frames in order, each with the previous frame's map as its order
 * prior and the previous frame's fitted photo formation and light field as the start of its fit
 * (the chunk's first frame without them). Frames already done with the same settings are skipped and their
 * stored map and fit (exact: JSON keeps every double) are read back for the next frame, so a
 * resumed run maps every frame exactly as an uninterrupted one. A failing frame is reported and
 * the next frame starts afresh.
 */
import { readFile } from 'node:fs/promises';
import { decodeNpy } from '../io/decodeNpy.js';
import { frameNpyPath, isFrameDone, readFrameRecord } from './frameFiles.js';
import { frameRecordOf, writeFrameOutputs } from './writeFrameOutputs.js';
import { frameSettingsHash } from './frameSource.js';
import type { FrameEvent, FrameJob, FrameProcessor } from './types.js';
import { frameReader } from './frameReader.js';
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

async function storedMap(outDir: string, frame: FrameJob, size: ChunkContext['expectedSize']): Promise<Float32Array | null> {
  try {
    const npy = decodeNpy(await readFile(frameNpyPath(outDir, frame.stem)), frame.stem);
    const [height, width] = npy.shape;
    if (!(npy.data instanceof Float32Array) || npy.shape.length !== 2) return null;
    if (size && (width !== size.width || height !== size.height)) return null;
    return npy.data;
  } catch {
    return null;
  }
}

/** A light field fitted on a frame starts the next; a calibration's is applied to every frame anyway. */
function carriedField(field: MapResult['exposureField'] | undefined): readonly number[] | null {
  return field && field.source === 'photo' ? field.logGainCoefficients : null;
}

function messageOf(error: unknown): string {
  return (error instanceof Error ? error.message : String(error)).replace(/\s*\n\s*/g, ' ');
}

export async function runChunk(chunk: readonly FrameJob[], processor: FrameProcessor, context: ChunkContext): Promise<void> {
  const { outDir, settingsHash, previews, expectedSize, onFrame } = context;
  const writePreviews = previews && processor.writePreviews ? processor.writePreviews.bind(processor) : null;
  // Frames of a video or stack are decoded here, in order (one decoder run for a video's chunk).
  const reader = frameReader(chunk);
  try {
    await runFramesOfChunk(chunk, processor, context, writePreviews, reader);
  } finally {
    await reader.close();
  }
}

async function mapContainerFrame(
  processor: FrameProcessor,
  reader: ReturnType<typeof frameReader>,
  frame: FrameJob,
  prior: Float32Array | null,
  fit: MapResult['fitted'] | null,
  field: readonly number[] | null,
): Promise<MapResult> {
  if (!processor.mapPhoto) throw new Error('this frame processor cannot map frames of a video or stack');
  const photo = await reader.photoOf(frame);
  return processor.mapPhoto(photo, frame.name, prior, fit, field);
}

async function runFramesOfChunk(
  chunk: readonly FrameJob[],
  processor: FrameProcessor,
  context: ChunkContext,
  writePreviews: FrameProcessor['writePreviews'] | null,
  reader: ReturnType<typeof frameReader>,
): Promise<void> {
  const { outDir, settingsHash, previews, expectedSize, onFrame } = context;
  let previous: {
    frame: FrameJob;
    map: Float32Array | null;
    fitted: MapResult['fitted'] | null;
    field: readonly number[] | null;
    stored: boolean;
    hash: string;
  } | null = null;
  for (const frame of chunk) {
    if (context.isAborted?.()) return;
    // The series' settings and data files combined with the frame's own file.
    // (and the frame before it in the chunk, whose map is the prior).
    const frameHash = frameSettingsHash(settingsHash, frame, previous?.hash ?? null);
    if (await isFrameDone(outDir, frame.stem, frameHash, previews)) {
      previous = { frame, map: null, fitted: null, field: null, stored: true, hash: frameHash };
      onFrame({ index: frame.index, name: frame.name, outcome: 'skipped' });
      continue;
    }
    try {
      let prior: Float32Array | null = null;
      let previousFit: MapResult['fitted'] | null = null;
      let previousField: readonly number[] | null = null;
      if (previous !== null) {
        prior = previous.stored ? await storedMap(outDir, previous.frame, expectedSize) : previous.map;
        const record = previous.stored ? await readFrameRecord(outDir, previous.frame.stem) : null;
        previousFit = previous.stored ? (record?.fitted ?? null) : previous.fitted;
        previousField = previous.stored ? carriedField(record?.exposureField) : previous.field;
      }
      const priorFrame = prior === null ? null : previous!.frame.name;
      const fit = prior === null ? null : previousFit;
      const field = prior === null ? null : previousField;
      const result: MapResult = frame.container
        ? await mapContainerFrame(processor, reader, frame, prior, fit, field)
        : await processor.map(frame.path, prior, fit, field);
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
      previous = {
        frame,
        map: result.thicknessNm,
        fitted: result.fitted,
        field: carriedField(result.exposureField),
        stored: false,
        hash: mappedHash,
      };
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
