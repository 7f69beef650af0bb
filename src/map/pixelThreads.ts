/**
 * Runs the mapper's pixel pass (./pixelPass.ts), and the evening of a photo by a light field
 * (./evenOutLight.ts), on chunks of rows in parallel: the calling
 * thread and helper worker threads (./pixelWorker.ts, `node:worker_threads`) each take the next
 * chunk from a shared counter until none is left. The call stays synchronous, so `mapPixels` keeps its plain signature: tasks are
 * posted to the helpers and the caller blocks in `Atomics.wait` on a small shared control block
 * until each helper has written its summed counts (the pattern of synchronous calls into a worker).
 * Every pixel is computed exactly as on one thread (each thread keeps its own colour memo, which
 * changes no number), so the map is identical whatever the count.
 *
 * The large arrays (photo, status, outputs) must live in SharedArrayBuffers (the photo's pixels
 * are put in one by `sharedPixels`, ./photoPixels.ts, when they are not); small ones are copied
 * with each task. Helpers are started on first use
 * and kept (unreferenced, so they never hold the process open). Where the compiled worker file
 * is missing (running from TypeScript sources) or a helper fails to start, the pass runs on the
 * calling thread alone.
 */
import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { MessageChannel, receiveMessageOnPort, Worker, type MessagePort } from 'node:worker_threads';
import type { PixelPassCounts, PixelPassInput, PixelPassOutput, ScoreInput } from './pixelPass.js';
import type { EvenLightInput } from './evenLightInput.js';
import type { PhotoPixels } from './photoPixels.js';

/** Slots of the shared control block, and the states of its `state` slot. */
export const CONTROL = { state: 0, first: 1, second: 2, starting: 0, ready: 1, busy: 2, done: 3, failed: 4 } as const;

/** A match task's input: the pass input without its per-thread cube and memo. */
export type SharedPassInput = Omit<PixelPassInput, 'cube' | 'memo'> & { cubeLevels: number; perCell: number; eightBit: boolean };

/**
 * Rows are handed out in chunks from a shared counter: every thread, the caller included, takes
 * the next chunk until none is left (`nextChunk`), so a thread slowed by the machine or by a hard
 * part of the photo (many distinct colours) does not hold up the others.
 */
export interface ChunkQueue {
  /** Int32 slot 0: the index of the next chunk to take. */
  readonly next: SharedArrayBuffer;
  readonly chunkRows: number;
  readonly height: number;
}
export type BandTask =
  | { kind: 'match'; input: SharedPassInput; output: PixelPassOutput; queue: ChunkQueue }
  | { kind: 'score'; input: ScoreInput; output: PixelPassOutput; queue: ChunkQueue }
  | { kind: 'even'; input: EvenLightInput; output: PhotoPixels; queue: ChunkQueue };

/** Rows [y0, y1) of the next chunk of the queue, or null when every chunk is taken. */
export function nextChunk(queue: ChunkQueue, counter: Int32Array): [number, number] | null {
  const y0 = Atomics.add(counter, 0, 1) * queue.chunkRows;
  return y0 < queue.height ? [y0, Math.min(queue.height, y0 + queue.chunkRows)] : null;
}

/** Rows per chunk: about eight chunks per thread, at least 16 rows. */
function chunkRowsFor(height: number, threads: number): number {
  return Math.max(16, Math.ceil(height / (threads * 8)));
}

interface Helper {
  readonly worker: Worker;
  readonly control: Int32Array;
  readonly replies: MessagePort;
}

/** How long a helper may take to start, and at least how long a band may take. */
const START_TIMEOUT_MS = 20_000;
const BAND_TIMEOUT_MS = 600_000;

const helpers: Helper[] = [];
let unavailable = false;

/** Up to `count` started helpers (fewer, possibly none, when they cannot be started). */
function startHelpers(count: number): Helper[] {
  if (unavailable) return helpers.slice(0, count);
  const url = new URL('./pixelWorker.js', import.meta.url);
  if (url.protocol !== 'file:' || !existsSync(fileURLToPath(url))) {
    unavailable = true;
    return [];
  }
  while (helpers.length < count) {
    const control = new Int32Array(new SharedArrayBuffer(4 * 4));
    const { port1, port2 } = new MessageChannel();
    let worker: Worker;
    try {
      worker = new Worker(url, { workerData: { control: control.buffer, replies: port2 }, transferList: [port2] });
    } catch {
      unavailable = true;
      break;
    }
    worker.unref();
    port1.unref();
    Atomics.wait(control, CONTROL.state, CONTROL.starting, START_TIMEOUT_MS);
    if (Atomics.load(control, CONTROL.state) !== CONTROL.ready) {
      void worker.terminate();
      unavailable = true;
      break;
    }
    worker.on('error', () => undefined); // reported through the control block instead
    helpers.push({ worker, control, replies: port1 });
  }
  return helpers.slice(0, count);
}

/**
 * Runs the rows of the photo in chunks on this thread and up to `threads − 1` helpers (each
 * takes chunks from a shared queue until none is left); returns each thread's summed result.
 */
function runBands<T>(
  threads: number,
  height: number,
  post: (queue: ChunkQueue) => BandTask,
  local: (y0: number, y1: number) => T,
  read: (control: Int32Array) => T,
  add: (a: T, b: T) => T,
): T {
  const started = threads > 1 ? startHelpers(threads - 1) : [];
  const queue: ChunkQueue = { next: new SharedArrayBuffer(4), chunkRows: chunkRowsFor(height, started.length + 1), height };
  const counter = new Int32Array(queue.next);
  for (const helper of started) {
    Atomics.store(helper.control, CONTROL.state, CONTROL.busy);
    helper.worker.postMessage(post(queue));
  }
  let total: T | null = null;
  for (let rows = nextChunk(queue, counter); rows; rows = nextChunk(queue, counter)) {
    const part = local(rows[0], rows[1]);
    total = total === null ? part : add(total, part);
  }
  for (const helper of started) {
    Atomics.wait(helper.control, CONTROL.state, CONTROL.busy, BAND_TIMEOUT_MS);
    const state = Atomics.load(helper.control, CONTROL.state);
    if (state === CONTROL.failed) {
      const reply = receiveMessageOnPort(helper.replies);
      throw new Error(`pixel thread failed: ${reply ? String(reply.message) : 'no reason given'}`);
    }
    if (state !== CONTROL.done) throw new Error(`pixel thread did not finish its rows within ${BAND_TIMEOUT_MS / 1000} s`);
    const part = read(helper.control);
    total = total === null ? part : add(total, part);
  }
  // A photo has at least one row, and the caller always takes a chunk or a helper did.
  return total as T;
}

/** The pixel pass's matching over all rows, on up to `threads` threads; counts are summed. */
export function matchPixelsThreaded(
  input: SharedPassInput,
  output: PixelPassOutput,
  threads: number,
  local: (y0: number, y1: number) => PixelPassCounts,
): PixelPassCounts {
  return runBands(
    threads,
    input.height,
    (queue) => ({ kind: 'match', input, output, queue }),
    local,
    (control) => ({ unresolved: control[CONTROL.first], discontinuous: control[CONTROL.second] }),
    (a, b) => ({ unresolved: a.unresolved + b.unresolved, discontinuous: a.discontinuous + b.discontinuous }),
  );
}

/** The pixel pass's scoring over all rows, on up to `threads` threads; returns the poor matches. */
export function scorePixelsThreaded(
  input: ScoreInput,
  output: PixelPassOutput,
  height: number,
  threads: number,
  local: (y0: number, y1: number) => number,
): number {
  return runBands(threads, height, (queue) => ({ kind: 'score', input, output, queue }), local, (control) => control[CONTROL.first], (a, b) => a + b);
}

/** The light field divided out of a photo (./evenOutLight.ts), rows shared on up to `threads` threads. */
export function evenRowsThreaded(input: EvenLightInput, output: PhotoPixels, threads: number, local: (y0: number, y1: number) => number): void {
  runBands(threads, input.height, (queue) => ({ kind: 'even', input, output, queue }), local, (control) => control[CONTROL.first], (a, b) => a + b);
}

/** A zero-filled Float32Array or Uint8Array of `length` in a SharedArrayBuffer. */
export function sharedFloat32(length: number): Float32Array {
  return new Float32Array(new SharedArrayBuffer(length * 4));
}
export function sharedUint8(length: number): Uint8Array {
  return new Uint8Array(new SharedArrayBuffer(length));
}

/** Threads a map uses unless told otherwise: the available cores, at most 4. */
export function defaultThreads(): number {
  return Math.max(1, Math.min(4, availableParallelism()));
}

/** How many helper threads are running (for tests and diagnostics). */
export function helperThreadCount(): number {
  return helpers.length;
}
