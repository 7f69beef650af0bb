/**
 * Worker-thread entry of the mapper's pixel pass and of evening a photo by a light field (see ./pixelThreads.ts). Receives tasks whose
 * large arrays live in SharedArrayBuffers, runs `matchPixelRows` or `scorePixelRows` on chunks of
 * rows taken from the shared queue until none is left, writes the counts into the shared control block and wakes the waiting main thread. Each
 * match task builds its own colour cube (a deterministic function of the predicted table) and
 * colour memo (what it holds depends on the rows this thread took, but it changes no number), so
 * every thread finds the same answer for the same pixel.
 */
import { parentPort, workerData, type MessagePort } from 'node:worker_threads';
import { createCandidateCube } from './candidateCube.js';
import { createMatchScratch } from './matchColour.js';
import { createColourMemo, matchPixelRows, pixelPassInput, releaseColourMemo, scorePixelRows, type ScoreInput } from './pixelPass.js';
import { CONTROL, nextChunk, type BandTask } from './pixelThreads.js';
import { evenOutLightRows } from './evenOutLight.js';

const { control: controlBuffer, replies } = workerData as { control: SharedArrayBuffer; replies: MessagePort };
const control = new Int32Array(controlBuffer);

function finish(state: number): void {
  Atomics.store(control, CONTROL.state, state);
  Atomics.notify(control, CONTROL.state);
}

parentPort?.on('message', (task: BandTask) => {
  try {
    const counter = new Int32Array(task.queue.next);
    if (task.kind === 'match') {
      const { cubeLevels, perCell, eightBit, ...rest } = task.input;
      const input = pixelPassInput(rest, createCandidateCube(cubeLevels, perCell), eightBit ? createColourMemo(rest.count) : null);
      const scratch = createMatchScratch(perCell);
      let unresolved = 0;
      let discontinuous = 0;
      for (let rows = nextChunk(task.queue, counter); rows; rows = nextChunk(task.queue, counter)) {
        const counts = matchPixelRows(input, task.output, scratch, rows[0], rows[1]);
        unresolved += counts.unresolved;
        discontinuous += counts.discontinuous;
      }
      releaseColourMemo(input.memo);
      control[CONTROL.first] = unresolved;
      control[CONTROL.second] = discontinuous;
    } else if (task.kind === 'even') {
      let rows = 0;
      for (let chunk = nextChunk(task.queue, counter); chunk; chunk = nextChunk(task.queue, counter)) rows += evenOutLightRows(task.input, task.output, chunk[0], chunk[1]);
      control[CONTROL.first] = rows;
    } else {
      let poor = 0;
      for (let rows = nextChunk(task.queue, counter); rows; rows = nextChunk(task.queue, counter)) poor += scorePixelRows(task.input as ScoreInput, task.output, rows[0], rows[1]);
      control[CONTROL.first] = poor;
    }
    finish(CONTROL.done);
  } catch (error) {
    replies.postMessage(error instanceof Error ? `${error.name}: ${error.message}` : String(error));
    finish(CONTROL.failed);
  }
});

finish(CONTROL.ready);
