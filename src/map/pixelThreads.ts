/**
 * Runs the mapper's pixel pass (./pixelPass.ts) on horizontal bands in parallel: the calling
 * thread takes the first band, helper worker threads (./pixelWorker.ts, `node:worker_threads`)
 * the others. The call stays synchronous, so `mapPixels` keeps its plain signature: tasks are
 * posted to the helpers and the caller blocks in `Atomics.wait` on a small shared control block
 * until each helper has written its counts (the pattern of synchronous calls into a worker).
 * Every pixel is computed exactly as on one thread, so the map is identical whatever the count.
 *
 * The large arrays (photo, status, outputs) must live in SharedArrayBuffers (`sharedCopy` makes
 * one when they do not); small ones are copied with each task. Helpers are started on first use
 * and kept (unreferenced, so they never hold the process open). Where the compiled worker file
 * is missing (running from TypeScript sources) or a helper fails to start, the pass runs on the
 * calling thread alone.
 */
import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { MessageChannel, receiveMessageOnPort, Worker, type MessagePort } from 'node:worker_threads';
import type { PixelPassCounts, PixelPassInput, PixelPassOutput, ScoreInput } from './pixelPass.js';

/** Slots of the shared control block, and the states of its `state` slot. */
export const CONTROL = { state: 0, first: 1, second: 2, starting: 0, ready: 1, busy: 2, done: 3, failed: 4 } as const;

/** A match task's input: the pass input without its per-thread cube and memo. */
export type SharedPassInput = Omit<PixelPassInput, 'cube' | 'memo'> & { cubeLevels: number; perCell: number; eightBit: boolean };

export type BandTask =
  | { kind: 'match'; input: SharedPassInput; output: PixelPassOutput; y0: number; y1: number }
  | { kind: 'score'; input: ScoreInput; output: PixelPassOutput; y0: number; y1: number };

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

/** The rows of band `k` of `bands` over `height` rows. */
function bandRows(k: number, bands: number, height: number): [number, number] {
  return [Math.floor((k * height) / bands), Math.floor(((k + 1) * height) / bands)];
}

/**
 * Runs `local(y0, y1)` on the first band here and the task for the other bands on up to
 * `threads − 1` helpers; returns every band's result in band order.
 */
function runBands<T>(
  threads: number,
  height: number,
  post: (y0: number, y1: number) => BandTask,
  local: (y0: number, y1: number) => T,
  read: (control: Int32Array) => T,
): T[] {
  const started = threads > 1 ? startHelpers(threads - 1) : [];
  const bands = started.length + 1;
  const posted: Helper[] = [];
  for (let k = 1; k < bands; k++) {
    const helper = started[k - 1];
    const [y0, y1] = bandRows(k, bands, height);
    Atomics.store(helper.control, CONTROL.state, CONTROL.busy);
    helper.worker.postMessage(post(y0, y1));
    posted.push(helper);
  }
  const [y0, y1] = bandRows(0, bands, height);
  const results = [local(y0, y1)];
  for (const helper of posted) {
    Atomics.wait(helper.control, CONTROL.state, CONTROL.busy, BAND_TIMEOUT_MS);
    const state = Atomics.load(helper.control, CONTROL.state);
    if (state === CONTROL.failed) {
      const reply = receiveMessageOnPort(helper.replies);
      throw new Error(`pixel thread failed: ${reply ? String(reply.message) : 'no reason given'}`);
    }
    if (state !== CONTROL.done) throw new Error(`pixel thread did not finish its band within ${BAND_TIMEOUT_MS / 1000} s`);
    results.push(read(helper.control));
  }
  return results;
}

/** The pixel pass's matching over all rows, on up to `threads` threads; counts are summed. */
export function matchPixelsThreaded(
  input: SharedPassInput,
  output: PixelPassOutput,
  threads: number,
  local: (y0: number, y1: number) => PixelPassCounts,
): PixelPassCounts {
  const counts = runBands(
    threads,
    input.height,
    (y0, y1) => ({ kind: 'match', input, output, y0, y1 }),
    local,
    (control) => ({ unresolved: control[CONTROL.first], discontinuous: control[CONTROL.second] }),
  );
  return counts.reduce((a, b) => ({ unresolved: a.unresolved + b.unresolved, discontinuous: a.discontinuous + b.discontinuous }));
}

/** The pixel pass's scoring over all rows, on up to `threads` threads; returns the poor matches. */
export function scorePixelsThreaded(
  input: ScoreInput,
  output: PixelPassOutput,
  height: number,
  threads: number,
  local: (y0: number, y1: number) => number,
): number {
  return runBands(threads, height, (y0, y1) => ({ kind: 'score', input, output, y0, y1 }), local, (control) => control[CONTROL.first]).reduce(
    (a, b) => a + b,
    0,
  );
}

/** A typed array of the same values in a SharedArrayBuffer (the array itself when it is one). */
export function sharedCopy<T extends Float32Array | Uint8Array>(values: T): T {
  if (values.buffer instanceof SharedArrayBuffer) return values;
  const out = new (values.constructor as { new (buffer: SharedArrayBuffer): T })(new SharedArrayBuffer(values.byteLength));
  out.set(values);
  return out;
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
