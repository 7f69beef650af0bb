#!/usr/bin/env node
import { setFlagsFromString } from 'node:v8';

// Two V8 settings that change only where and when hot functions are compiled, never a result
// (the same bytes: compilation never changes what JavaScript computes). See DEVELOPERS.md,
// "Where the time goes".
//
// Worker threads (a series' frame workers, a map's pixel threads) compile their hot functions on
// their own thread instead of V8's shared background compiler: this applies to isolates created
// from here on, so the main thread is unchanged. Measured on this project's 2-core machine
// (2026-12-04, 12 frames of 2 MP, two runs each): two workers 12.4–12.7 s wall and 23.6 s CPU
// against 16.8–20.0 s and 31–38 s with the background compiler; one worker 7 % slower in wall
// time but 15 % less CPU.
//
// On-stack replacement (a long loop switched to optimised code while it runs) is compiled at once
// on the thread that asks, in every isolate, the main thread included (V8 reads this setting each
// time it asks). With the default background compilation, V8's helper threads spent about 1 s of
// CPU on a 12-MP `lamella map` (1.8–2.0 s against 0.8 s), most of it on loop compilations that
// came too late to be used. Measured 2026-12-05: 12-MP demo photo, `--outputs npy,json --threads 1`,
// five alternated pairs: 6.07 s CPU against 5.48 s (−10 %); default outputs and threads, four
// pairs: 8.80 s against 7.82 s, wall time unchanged (6.0–6.9 s both).
for (const flag of ['--no-concurrent-recompilation', '--no-concurrent-osr']) {
  try {
    setFlagsFromString(flag);
  } catch {
    // A runtime that refuses a late flag runs as before.
  }
}

const { run } = await import('../dist/cli/main.js');
process.exitCode = await run(process.argv);
