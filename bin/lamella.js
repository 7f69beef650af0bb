#!/usr/bin/env node
import { setFlagsFromString } from 'node:v8';

// Worker threads (a series' frame workers, a map's pixel threads) compile their hot functions on
// their own thread instead of V8's shared background compiler: the set-up applies to isolates
// created from here on, so the main thread is unchanged. It changes no result (the same bytes;
// compilation never changes what JavaScript computes). Measured on this project's 2-core machine
// (2026-12-04, 12 frames of 2 MP, two runs each): two workers 12.4–12.7 s wall and 23.6 s CPU
// against 16.8–20.0 s and 31–38 s with the background compiler; one worker 7 % slower in wall
// time but 15 % less CPU. See DEVELOPERS.md, "Where the time goes".
try {
  setFlagsFromString('--no-concurrent-recompilation');
} catch {
  // A runtime that refuses late flags runs as before.
}

const { run } = await import('../dist/cli/main.js');
process.exitCode = await run(process.argv);
