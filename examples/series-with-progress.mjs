// Map the first six frames of the demo's draining film as a series, with progress and a way to stop.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runSeries } from 'lamella';

const frames = [1, 2, 3, 4, 5, 6].map((k) => new URL(`../fixtures/demo/film_00${k}.jpg`, import.meta.url).pathname);
const controller = new AbortController(); // controller.abort() stops after the frames in flight
const result = await runSeries(frames, { stack: 'soap-film', light: 'D65', fps: 2, thinBelowNm: 100, workers: 1, outDir: mkdtempSync(join(tmpdir(), 'series-')) }, {
  signal: controller.signal,
  onProgress: (p) => console.log(`frame ${p.done}/${p.total} (${p.failed} failed)`),
});
console.log(`interrupted: ${result.interrupted}; outputs: ${result.outputs.join(', ')}`);
