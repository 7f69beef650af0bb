/**
 * Runs the chunks of a series, either in this thread (`workers: 0`, with a processor object:
 * used by tests) or on a pool of worker threads (`node:worker_threads`) that each build their own
 * processor from a `ProcessorSource`. Chunks are handed out one at a time to whichever worker is
 * free. On abort every worker is terminated and partial frame outputs are removed.
 */
import { Worker } from 'node:worker_threads';
import { removePartialFrames } from './frameFiles.js';
import { runChunk, type ChunkContext } from './runChunk.js';
import type { FrameEvent, FrameJob, FrameProcessor, ProcessorSource, SeriesProgress } from './types.js';

export interface RunFramesOptions {
  readonly chunks: readonly FrameJob[][];
  readonly outDir: string;
  readonly settingsHash: string;
  readonly inputFiles?: Readonly<Record<string, string>>;
  readonly previews: boolean;
  readonly expectedSize: ChunkContext['expectedSize'];
  /** Number of worker threads; 0 maps in this thread and needs `processor` to be an object. */
  readonly workers: number;
  readonly processor: ProcessorSource | FrameProcessor;
  readonly signal?: AbortSignal;
  readonly onFrame?: (event: FrameEvent, progress: SeriesProgress) => void;
}

export interface RunFramesResult {
  readonly events: FrameEvent[];
  readonly interrupted: boolean;
}

function stemsOf(chunks: readonly FrameJob[][]): Set<string> {
  return new Set(chunks.flat().map((f) => f.stem));
}

function isSource(p: ProcessorSource | FrameProcessor): p is ProcessorSource {
  return typeof (p as ProcessorSource).moduleUrl === 'string';
}

export async function runFrames(options: RunFramesOptions): Promise<RunFramesResult> {
  const { chunks, outDir, settingsHash, previews, expectedSize, signal } = options;
  if (!Number.isInteger(options.workers) || options.workers < 0) throw new RangeError(`workers must be a whole number >= 0, received ${options.workers}`);
  const total = chunks.reduce((n, c) => n + c.length, 0);
  const events: FrameEvent[] = [];
  const started = Date.now();
  const counts: Record<FrameEvent['outcome'], number> = { mapped: 0, skipped: 0, failed: 0 };
  const onFrame = (event: FrameEvent): void => {
    events.push(event);
    counts[event.outcome] += 1;
    const progress = { done: events.length, total, ...counts, elapsedMs: Date.now() - started };
    options.onFrame?.(event, progress);
  };
  const base = { outDir, settingsHash, previews, expectedSize, ...(options.inputFiles ? { inputFiles: options.inputFiles } : {}) };
  if (options.workers === 0) {
    if (isSource(options.processor)) throw new TypeError('processor must be a FrameProcessor object when workers is 0');
    for (const chunk of chunks) {
      if (signal?.aborted) break;
      await runChunk(chunk, options.processor, { ...base, onFrame, isAborted: () => signal?.aborted ?? false });
    }
    const interrupted = signal?.aborted ?? false;
    if (interrupted) await removePartialFrames(outDir, stemsOf(chunks));
    return { events, interrupted };
  }
  if (!isSource(options.processor)) throw new TypeError('processor must be a ProcessorSource { moduleUrl, config } when workers > 0');
  const source = options.processor;
  const queue = [...chunks];
  const pool: Worker[] = [];
  const poolSize = Math.min(options.workers, queue.length);
  let interrupted = false;
  await new Promise<void>((resolve, reject) => {
    let finished = 0;
    let settled = false;
    const settle = (error?: Error): void => {
      if (settled) return;
      settled = true;
      signal?.removeEventListener('abort', onAbort);
      void Promise.all(pool.map((w) => w.terminate())).then(() => (error ? reject(error) : resolve()));
    };
    const onAbort = (): void => {
      interrupted = true;
      settle();
    };
    if (poolSize === 0) return settle();
    if (signal?.aborted) return onAbort();
    signal?.addEventListener('abort', onAbort);
    const next = (worker: Worker): void => {
      const chunk = queue.shift();
      if (chunk === undefined) {
        finished += 1;
        if (finished === poolSize) settle();
        return;
      }
      worker.postMessage({ type: 'chunk', chunk, context: base });
    };
    for (let i = 0; i < poolSize; i++) {
      const worker = new Worker(new URL('./chunkWorker.js', import.meta.url), { workerData: source });
      pool.push(worker);
      worker.on('message', (message: { type: string; event?: FrameEvent; message?: string }) => {
        if (settled) return;
        if (message.type === 'frame' && message.event) onFrame(message.event);
        else if (message.type === 'ready' || message.type === 'chunkDone') next(worker);
        else if (message.type === 'fatal') settle(new Error(message.message));
      });
      worker.on('error', (error) => settle(error));
      worker.on('exit', (code) => {
        if (!settled && code !== 0) settle(new Error(`series worker stopped with exit code ${code}`));
      });
    }
  });
  if (interrupted) await removePartialFrames(outDir, stemsOf(chunks));
  return { events, interrupted };
}
