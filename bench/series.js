// Speed of `lamella series`: frames per second for 2-MP frames (1632×1224) with 1 and 2 worker
// threads, and the series overhead per frame over mapping the same frames in-process with the
// same priors (worker start-up and its colour table, per-frame records and maps on disk, resume
// checks, aggregation, drainage fits); the cost of a frame mapped with the previous frame (warm)
// against one alone (cold), in-process; and the same frames read from an H.264 video through FFmpeg.
// Frames: the demo's invented drainage model (scripts/make-demo.js). Run after building:
// `node bench/series.js [frames]` (or through bench/run.js, which calls benchSeries()).
import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeImage } from '../dist/io/writeImage.js';
import { runSeries } from '../dist/series/runSeries.js';
import { MAP_FRAME_PROCESSOR_URL } from '../dist/series/mapFrameConfig.js';
import { createFrameProcessor } from '../dist/series/mapFrameProcessor.js';
import { DEMO, renderDemoFrame } from '../scripts/make-demo.js';
import { findFfmpeg } from '../dist/io/ffmpegBinary.js';
import { spawnSync } from 'node:child_process';

export async function benchSeries({ frames = 6, width = 1632, height = 1224 } = {}) {
  const dir = await mkdtemp(join(tmpdir(), 'lamella-bench-series-'));
  try {
    await mkdir(join(dir, 'in'));
    for (let i = 0; i < frames; i++) {
      const { image } = renderDemoFrame(i * 4, width, height);
      await writeImage(join(dir, 'in', `f${String(i).padStart(3, '0')}.jpg`), image, { quality: 90 });
    }
    const config = {
      stackOptions: DEMO.stackOptions, light: 'D65', whiteBalanceLight: null, thinBelowNm: DEMO.THIN_BELOW_NM,
      maxThicknessNm: 2000, filmIndexScale: null, exposureFixed: null,
    };
    // In-process reference: the same frames mapped in order, each with the previous frame's map,
    // statuses and light field (what one worker does within a chunk, without the series around
    // it), after one warm-up map (colour table built); and each frame alone (a chunk's first
    // frame: no previous frame), for the cost of a warm frame against a cold one.
    const processor = await createFrameProcessor(config);
    const paths = Array.from({ length: frames }, (_, i) => join(dir, 'in', `f${String(i).padStart(3, '0')}.jpg`));
    await processor.map(paths[0], null);
    const t0 = performance.now();
    let previous = null;
    for (const path of paths) {
      const field = previous?.exposureField?.source === 'photo' ? previous.exposureField.logGainCoefficients : null;
      previous = await processor.map(path, previous?.thicknessNm ?? null, previous?.fitted ?? null, field, previous?.status ?? null);
    }
    const singleMapMs = (performance.now() - t0) / frames;
    const t1 = performance.now();
    for (const path of paths) await processor.map(path, null);
    const coldMapMs = (performance.now() - t1) / frames;
    const results = [];
    for (const workers of [1, 2]) {
      const started = performance.now();
      await runSeries({
        inputs: [join(dir, 'in')], outDir: join(dir, `out${workers}`), fps: DEMO.fps, thinBelowNm: DEMO.THIN_BELOW_NM,
        workers, chunkFrames: workers === 1 ? frames : Math.ceil(frames / 2), mapSettings: { ...DEMO.stackOptions, light: 'D65' },
        processor: { moduleUrl: MAP_FRAME_PROCESSOR_URL, config }, report: false,
      });
      const seconds = (performance.now() - started) / 1000;
      results.push({ workers, seconds, framesPerSecond: frames / seconds });
    }
    const overheadMsPerFrame = (results[0].seconds * 1000) / frames - singleMapMs;
    // The same frames as one H.264 video (high quality, 4:2:0), read through FFmpeg, when available.
    const video = [];
    const ffmpeg = findFfmpeg();
    if (ffmpeg) {
      const encoded = spawnSync(ffmpeg, ['-hide_banner', '-loglevel', 'error', '-y', '-framerate', String(DEMO.fps), '-pattern_type', 'glob', '-i', join(dir, 'in', 'f*.jpg'),
        '-c:v', 'libx264', '-crf', '12', '-pix_fmt', 'yuv420p', join(dir, 'run.mp4')]);
      if (encoded.status === 0) {
        for (const workers of [1, 2]) {
          const started = performance.now();
          await runSeries({
            inputs: [join(dir, 'run.mp4')], outDir: join(dir, `video${workers}`), thinBelowNm: DEMO.THIN_BELOW_NM,
            workers, chunkFrames: workers === 1 ? frames : Math.ceil(frames / 2), mapSettings: { ...DEMO.stackOptions, light: 'D65' },
            processor: { moduleUrl: MAP_FRAME_PROCESSOR_URL, config }, report: false,
          });
          const seconds = (performance.now() - started) / 1000;
          video.push({ workers, seconds, framesPerSecond: frames / seconds });
        }
      }
    }
    return { frames, width, height, singleMapMs, coldMapMs, results, video, overheadMsPerFrame, loadAverage: loadavg()[0] };
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const r = await benchSeries({ frames: Number(process.argv[2] ?? 6) });
  console.log(`series ${r.frames} frames of ${r.width}×${r.height}: ${r.singleMapMs.toFixed(0)} ms per frame mapped in-process (warm)`);
  console.log(`  each frame alone (a chunk's first frame): ${r.coldMapMs.toFixed(0)} ms; warm/cold ${(r.singleMapMs / r.coldMapMs).toFixed(2)}`);
  for (const x of r.results) console.log(`  ${x.workers} worker(s): ${x.framesPerSecond.toFixed(2)} frames/s (${x.seconds.toFixed(1)} s)`);
  for (const x of r.video) console.log(`  the same frames as an H.264 video, ${x.workers} worker(s): ${x.framesPerSecond.toFixed(2)} frames/s (${x.seconds.toFixed(1)} s)`);
  console.log(`  overhead per frame over in-process mapping (1 worker, incl. worker start and its colour table): ${r.overheadMsPerFrame.toFixed(0)} ms`);
  console.log(`  (1-min load average at the end: ${r.loadAverage.toFixed(1)}; numbers on a busy machine are not comparable)`);
}
