/**
 * Worker-thread entry of a series (`node:worker_threads`). Receives `{ moduleUrl, config }` as
 * workerData, builds its frame processor once, then maps the chunks the main thread sends, one
 * at a time, reporting each frame. Messages: in `{ type: 'chunk', chunk, context }`;
 * out `{ type: 'ready' }`, `{ type: 'frame', event }`, `{ type: 'chunkDone' }`, `{ type: 'fatal', message }`.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { runChunk, type ChunkContext } from './runChunk.js';
import type { FrameJob, FrameProcessor, ProcessorSource } from './types.js';

type ChunkMessage = { type: 'chunk'; chunk: FrameJob[]; context: Omit<ChunkContext, 'onFrame' | 'isAborted'> };

async function main(): Promise<void> {
  const port = parentPort;
  if (port === null) throw new Error('chunkWorker must run in a worker thread');
  const source = workerData as ProcessorSource;
  let processor: FrameProcessor;
  try {
    const mod = (await import(source.moduleUrl)) as { createFrameProcessor?: (config: unknown) => Promise<FrameProcessor> };
    if (typeof mod.createFrameProcessor !== 'function') throw new TypeError(`processor module ${source.moduleUrl} must export createFrameProcessor(config)`);
    processor = await mod.createFrameProcessor(source.config);
  } catch (error) {
    port.postMessage({ type: 'fatal', message: `series worker cannot start the frame processor: ${error instanceof Error ? error.message : String(error)}` });
    return;
  }
  port.on('message', (message: ChunkMessage) => {
    if (message.type !== 'chunk') return;
    const context: ChunkContext = { ...message.context, onFrame: (event) => port.postMessage({ type: 'frame', event }) };
    runChunk(message.chunk, processor, context).then(
      () => port.postMessage({ type: 'chunkDone' }),
      (error: unknown) => port.postMessage({ type: 'fatal', message: error instanceof Error ? error.message : String(error) }),
    );
  });
  port.postMessage({ type: 'ready' });
}

void main();
