/**
 * The full single-map view of a series' last frame for the report (`SeriesReportInput.lastMap`),
 * from the frame's stored result: its thickness, status and confidence maps and its record, with
 * the frame's photo decoded once more for the pictures (no second mapping, so the view shows the
 * numbers `series.csv` holds). Frames stored by older versions (no confidence map) are mapped
 * again with the prior they had. Needs a processor that can build a report view; otherwise null.
 */
import { readFile } from 'node:fs/promises';
import { decodeNpy } from '../io/decodeNpy.js';
import type { MapReportInput } from '../report/types.js';
import { frameNpyPath, readFrameRecord } from './frameFiles.js';
import type { FrameJob, FrameProcessor, ProcessorSource, StoredFrame } from './types.js';
import { frameReader } from './frameReader.js';

export async function processorOf(source: ProcessorSource | FrameProcessor): Promise<FrameProcessor> {
  if (typeof (source as ProcessorSource).moduleUrl !== 'string') return source as FrameProcessor;
  const { moduleUrl, config } = source as ProcessorSource;
  const mod = (await import(moduleUrl)) as { createFrameProcessor: (config: unknown) => Promise<FrameProcessor> };
  return mod.createFrameProcessor(config);
}

async function readArray(path: string): Promise<Float32Array | Uint8Array | null> {
  try {
    const npy = decodeNpy(await readFile(path), path);
    return npy.data instanceof Float32Array || npy.data instanceof Uint8Array ? npy.data : null;
  } catch {
    return null;
  }
}

export async function storedFrame(outDir: string, frame: FrameJob): Promise<StoredFrame | null> {
  const record = await readFrameRecord(outDir, frame.stem);
  if (!record) return null;
  const [thicknessNm, status, confidence] = await Promise.all(
    (['thickness', 'status', 'confidence'] as const).map((what) => readArray(frameNpyPath(outDir, frame.stem, what))),
  );
  const n = record.width * record.height;
  if (!(thicknessNm instanceof Float32Array) || !(status instanceof Uint8Array) || !(confidence instanceof Float32Array)) return null;
  if (thicknessNm.length !== n || status.length !== n || confidence.length !== n) return null;
  return { record, thicknessNm, status, confidence };
}

export async function lastFrameView(
  outDir: string,
  frame: FrameJob,
  frames: readonly FrameJob[],
  source: ProcessorSource | FrameProcessor,
): Promise<MapReportInput | null> {
  const processor = await processorOf(source);
  if (!processor.mapReportInput) return null;
  const reader = frameReader([frame]);
  try {
    const stored = processor.storedReportInput ? await storedFrame(outDir, frame) : null;
    if (stored && processor.storedReportInput) return await processor.storedReportInput(stored, await reader.photoOf(frame), frame.path);
    // An older output folder: map the frame again with the prior it had.
    const record = await readFrameRecord(outDir, frame.stem);
    const priorFrame = record?.priorFrame ? frames.find((f) => f.name === record.priorFrame) : undefined;
    const prior = priorFrame ? await readArray(frameNpyPath(outDir, priorFrame.stem)) : null;
    const priorMap = prior instanceof Float32Array ? prior : null;
    if (frame.container) {
      if (!processor.mapPhoto) return null;
      return processor.mapReportInput(await processor.mapPhoto(await reader.photoOf(frame), frame.name, priorMap), frame.path);
    }
    return processor.mapReportInput(await processor.map(frame.path, priorMap), frame.path);
  } finally {
    await reader.close();
  }
}
