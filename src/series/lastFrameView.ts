/**
 * The full single-map view of a series' last frame for the report (`SeriesReportInput.lastMap`).
 * Per-frame results on disk hold numbers, not pictures, so the last frame is mapped once more in
 * this thread, with the same prior it had (its recorded `priorFrame`'s stored map), which gives
 * the same map. Needs a processor that can build a report view; otherwise returns null.
 */
import { readFile } from 'node:fs/promises';
import { decodeNpy } from '../io/decodeNpy.js';
import type { MapReportInput } from '../report/types.js';
import { frameNpyPath, readFrameRecord } from './frameFiles.js';
import type { FrameJob, FrameProcessor, ProcessorSource } from './types.js';
import { frameReader } from './frameReader.js';

async function processorOf(source: ProcessorSource | FrameProcessor): Promise<FrameProcessor> {
  if (typeof (source as ProcessorSource).moduleUrl !== 'string') return source as FrameProcessor;
  const { moduleUrl, config } = source as ProcessorSource;
  const mod = (await import(moduleUrl)) as { createFrameProcessor: (config: unknown) => Promise<FrameProcessor> };
  return mod.createFrameProcessor(config);
}

export async function lastFrameView(
  outDir: string,
  frame: FrameJob,
  frames: readonly FrameJob[],
  source: ProcessorSource | FrameProcessor,
): Promise<MapReportInput | null> {
  const processor = await processorOf(source);
  if (!processor.mapReportInput) return null;
  const record = await readFrameRecord(outDir, frame.stem);
  const priorFrame = record?.priorFrame ? frames.find((f) => f.name === record.priorFrame) : undefined;
  let prior: Float32Array | null = null;
  if (priorFrame) {
    const npy = decodeNpy(await readFile(frameNpyPath(outDir, priorFrame.stem)), priorFrame.stem);
    if (npy.data instanceof Float32Array) prior = npy.data;
  }
  let result;
  if (frame.container) {
    if (!processor.mapPhoto) return null;
    const reader = frameReader([frame]);
    try {
      result = await processor.mapPhoto(await reader.photoOf(frame), frame.name, prior);
    } finally {
      await reader.close();
    }
  } else result = await processor.map(frame.path, prior);
  return processor.mapReportInput(result, frame.path);
}
