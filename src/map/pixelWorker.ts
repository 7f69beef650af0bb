/**
 * Worker-thread entry of the mapper's pixel pass (see ./pixelThreads.ts). Receives band tasks
 * whose large arrays live in SharedArrayBuffers, runs `matchPixelRows` or `scorePixelRows` on its
 * rows, writes the counts into the shared control block and wakes the waiting main thread. Each
 * match task builds its own colour cube and colour memo (both are deterministic functions of
 * the predicted table, so every thread finds the same answer for the same pixel).
 */
import { parentPort, workerData, type MessagePort } from 'node:worker_threads';
import { createCandidateCube } from './candidateCube.js';
import { createMatchScratch } from './matchColour.js';
import { createAlternativeMemo, matchPixelRows, scorePixelRows, type PixelPassInput, type ScoreInput } from './pixelPass.js';
import { CONTROL, type BandTask } from './pixelThreads.js';

const { control: controlBuffer, replies } = workerData as { control: SharedArrayBuffer; replies: MessagePort };
const control = new Int32Array(controlBuffer);

function finish(state: number): void {
  Atomics.store(control, CONTROL.state, state);
  Atomics.notify(control, CONTROL.state);
}

parentPort?.on('message', (task: BandTask) => {
  try {
    if (task.kind === 'match') {
      const { cubeLevels, perCell, eightBit, ...rest } = task.input;
      const input: PixelPassInput = {
        ...rest,
        cube: createCandidateCube(cubeLevels, perCell),
        memo: eightBit ? createAlternativeMemo(rest.count) : null,
      };
      const counts = matchPixelRows(input, task.output, createMatchScratch(perCell), task.y0, task.y1);
      control[CONTROL.first] = counts.unresolved;
      control[CONTROL.second] = counts.discontinuous;
    } else {
      control[CONTROL.first] = scorePixelRows(task.input as ScoreInput, task.output, task.y0, task.y1);
    }
    finish(CONTROL.done);
  } catch (error) {
    replies.postMessage(error instanceof Error ? `${error.name}: ${error.message}` : String(error));
    finish(CONTROL.failed);
  }
});

finish(CONTROL.ready);
