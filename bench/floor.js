// CPU time of `lamella map` and `lamella series` against a floor built in the same run (issue 18):
//
//   floor — decode the 12-MP JPEG with sharp, look each pixel up in a 32³ colour table (one read
//           per pixel), write one float32 .npy (atomically, with fsync, as the tool writes);
//   map   — `lamella map PHOTO --stack soap-film --out DIR --quiet --threads 1`, default outputs;
//   map npy,json — the same with `--outputs npy,json`;
//   series — `lamella series` over 320×240 and 2-MP frames with 1 worker (CPU per frame: the run's
//           CPU less a one-frame run's, over the extra frames) and the 2-MP run's wall time with
//           1 and 2 workers (throughput ratio), in chunks of half the frames so that each worker has one.
// For information it also prints two independent 1-worker runs at once (the machine's ceiling for
// two workers), the bound CPU time sets on the 2-worker figure (cores × 1 worker's wall ÷ 2
// workers' CPU: each worker warms up on its own), and a long series' throughput with 1 and 2
// workers (24 frames less the 6: start-up and warm-up cancel).
// Each is one child process run under GNU time (user + system CPU seconds, all threads, and the
// peak resident memory), so node's start-up and module loading count in every figure alike.
// Everything is measured in rounds (3; LAMELLA_BENCH_ROUNDS=N), one round after another, and
// each figure reported as the median over the rounds with its range.
// Photos: the demo's invented draining soap film (scripts/make-demo.js), JPEG quality 90, 4:2:0.
// Targets (issue 18): map ≤ 3× the floor's CPU and ≤ 600 MiB; npy,json ≤ 2×; a 320×240 series
// frame ≤ 0.25 s CPU, a 2-MP frame ≤ 0.7 s; 2 workers ≥ 1.7× the throughput of 1 on 2-MP frames.
// Run after building: `node bench/floor.js` (or through bench/run.js).
import { spawn, spawnSync } from 'node:child_process';
import { copyFile, mkdir, mkdtemp, rm } from 'node:fs/promises';
import { availableParallelism, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { renderDemoFrame } from '../scripts/make-demo.js';

/** glibc's tunable for transparent huge pages in malloc (glibc 2.35+; ignored by older ones). */
const HUGE_PAGES = 'glibc.malloc.hugetlb=1';
const SELF = fileURLToPath(import.meta.url);
const CLI = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));

/** One child under GNU time: CPU seconds (user + system) and peak RSS in MiB. */
function timed(args, label, env = process.env) {
  const started = performance.now();
  const r = spawnSync('/usr/bin/time', ['-f', 'LAMELLA_TIME %U %S %M', process.execPath, ...args], { encoding: 'utf8', maxBuffer: 1 << 24, env });
  const wallS = (performance.now() - started) / 1000;
  const match = /LAMELLA_TIME ([\d.]+) ([\d.]+) (\d+)/.exec(r.stderr);
  if (r.status !== 0 && r.status !== 1) throw new Error(`${label} failed (status ${r.status}): ${r.stderr.trim().split('\n').slice(-3).join(' ')}`);
  if (!match) throw new Error(`${label}: no timing from /usr/bin/time: ${r.stderr.slice(-300)}`);
  return { cpuS: Number(match[1]) + Number(match[2]), peakMiB: Number(match[3]) / 1024, wallS };
}

/** Wall seconds of two children run at once (from the start of both to the end of the later). */
async function wallOfPair(argsA, argsB) {
  const started = performance.now();
  const run = (args) =>
    new Promise((resolve, reject) => {
      const child = spawn(process.execPath, args, { stdio: ['ignore', 'ignore', 'pipe'] });
      let stderr = '';
      child.stderr.on('data', (chunk) => (stderr += chunk));
      child.on('error', reject);
      child.on('close', (status) => (status === 0 || status === 1 ? resolve() : reject(new Error(`pair run failed (status ${status}): ${stderr.trim().split('\n').slice(-3).join(' ')}`))));
    });
  await Promise.all([run(argsA), run(argsB)]);
  return (performance.now() - started) / 1000;
}

async function floorChild(photo, out) {
  const { writeNpy } = await import('../dist/io/encodeNpy.js');
  const { data, info } = await sharp(photo).raw().toBuffer({ resolveWithObject: true });
  const table = new Float32Array(32 * 32 * 32);
  for (let i = 0; i < table.length; i++) table[i] = (i % 2000) * 0.5;
  const pixels = info.width * info.height;
  const map = new Float32Array(pixels);
  const channels = info.channels;
  for (let p = 0, i = 0; p < pixels; p++, i += channels) map[p] = table[((data[i] >> 3) << 10) | ((data[i + 1] >> 3) << 5) | (data[i + 2] >> 3)];
  await writeNpy(out, map, [info.height, info.width]);
}

async function photoAt(dir, name, frame, width, height) {
  const { image } = renderDemoFrame(frame, width, height);
  const path = join(dir, name);
  await sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.byteLength), { raw: { width, height, channels: 3 } })
    .jpeg({ quality: 90, chromaSubsampling: '4:2:0' })
    .toFile(path);
  return path;
}

/** `count` frames (every 4th demo frame); those already in `from` (a folder of the same size) are copied, not rendered again. */
async function seriesFrames(dir, name, count, width, height, from = null) {
  const folder = join(dir, name);
  await mkdir(folder);
  for (let i = 0; i < count; i++) {
    const file = `f${String(i).padStart(3, '0')}.jpg`;
    if (from && i < from.frames) await copyFile(join(from.folder, file), join(folder, file));
    else await photoAt(folder, file, i * 4, width, height);
  }
  return folder;
}

/** `lamella series` arguments for `frames` frames in chunks of half, so that two workers have a chunk each (a chunk is the unit of work). */
function seriesArgs(frames) {
  return ['series', '--stack', 'soap-film', '--fps', '2', '--quiet', '--no-report', '--chunk-frames', String(Math.ceil(frames / 2))];
}

/** Rounds of every measurement, interleaved (LAMELLA_BENCH_ROUNDS overrides; at least 1). */
const ROUNDS = Math.max(1, Math.floor(Number(process.env.LAMELLA_BENCH_ROUNDS ?? 3)) || 3);

/**
 * Every measurement `rounds` times, one round after another (floor, maps, series in each round):
 * on a shared machine single runs vary by up to a third, and a ratio taken within one round
 * shares that round's conditions. `formatFloor` reports each figure's median over the rounds and
 * its range.
 */
export async function benchFloor({ width = 4000, height = 3000, smallFrames = 12, bigFrames = 6, longFrames = 24, rounds = ROUNDS } = {}) {
  const dir = await mkdtemp(join(tmpdir(), 'lamella-bench-floor-'));
  try {
    const photo = await photoAt(dir, 'film.jpg', 8, width, height);
    const folders = {};
    for (const [key, frames, w, h] of [['small', smallFrames, 320, 240], ['big', bigFrames, 1632, 1224], ['long', longFrames, 1632, 1224]]) {
      // The long series begins with the big one's frames (copied).
      folders[key] = { folder: await seriesFrames(dir, key, frames, w, h, key === 'long' ? folders.big : null), frames, width: w, height: h };
    }
    const results = [];
    for (let round = 0; round < rounds; round++) results.push(await benchRound(dir, `r${round}`, photo, folders));
    return { width, height, rounds: results };
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

async function benchRound(dir, tag, photo, folders) {
  const out = (name) => join(dir, `${tag}-${name}`);
  const floor = timed([SELF, '--floor', photo, out('floor.npy')], 'floor');
  const mapAll = timed([CLI, 'map', photo, '--stack', 'soap-film', '--out', out('all'), '--quiet', '--threads', '1'], 'map');
  // The same map with glibc's malloc asking for transparent huge pages (README, "Accuracy and
  // speed"): for information, on Linux with glibc 2.35 or later; not a target.
  const hugeEnv = { ...process.env, GLIBC_TUNABLES: HUGE_PAGES };
  const huge = process.platform === 'linux'
    ? {
        floor: timed([SELF, '--floor', photo, out('floor-huge.npy')], 'floor huge pages', hugeEnv),
        map: timed([CLI, 'map', photo, '--stack', 'soap-film', '--out', out('huge'), '--quiet', '--threads', '1'], 'map huge pages', hugeEnv),
      }
    : null;
  const mapLean = timed([CLI, 'map', photo, '--stack', 'soap-film', '--out', out('lean'), '--quiet', '--threads', '1', '--outputs', 'npy,json'], 'map npy,json');
  const series = {};
  for (const key of ['small', 'big']) {
    const { folder, frames, width: w, height: h } = folders[key];
    const base = seriesArgs(frames);
    const one = timed([CLI, ...base, join(folder, 'f000.jpg'), '--out', out(`${key}-1f`), '--workers', '1'], `series ${key} 1 frame`);
    const all = timed([CLI, ...base, folder, '--out', out(`${key}-w1`), '--workers', '1'], `series ${key}`);
    const perFrameS = (all.cpuS - one.cpuS) / (frames - 1);
    const two = key === 'big' ? timed([CLI, ...base, folder, '--out', out(`${key}-w2`), '--workers', '2'], `series ${key} 2 workers`) : null;
    // Two independent one-worker runs at once (information): what two processes get from this machine.
    const pairS = key === 'big'
      ? await wallOfPair([CLI, ...base, folder, '--out', out(`${key}-pa`), '--workers', '1'], [CLI, ...base, folder, '--out', out(`${key}-pb`), '--workers', '1'])
      : null;
    series[key] = { frames, width: w, height: h, perFrameS, wall1S: all.wallS, wall2S: two?.wallS ?? null, pairS, cpu1S: all.cpuS, cpu2S: two?.cpuS ?? null };
  }
  // A long series (information): the same two runs on 24 frames whose first 6 are the 6 above,
  // in chunks of half. What the 24-frame runs take beyond the 6-frame ones is the marginal frames'
  // time, with start-up, warm-up and each chunk's first frame cancelled out: the throughput a long
  // series gets from 2 workers.
  const { folder: longFolder, frames: longCount } = folders.long;
  const longBase = seriesArgs(longCount);
  const long1 = timed([CLI, ...longBase, longFolder, '--out', out('long-w1'), '--workers', '1'], 'series long');
  const long2 = timed([CLI, ...longBase, longFolder, '--out', out('long-w2'), '--workers', '2'], 'series long 2 workers');
  series.long = { frames: longCount, wall1S: long1.wallS, wall2S: long2.wallS };
  return { floor, mapAll, huge, mapLean, series };
}

/** Median and range of `values`. */
function spread(values) {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  const median = sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
  return { median, min: sorted[0], max: sorted[sorted.length - 1] };
}

/** "median (min–max over N rounds)" with `digits` decimals and an optional unit. */
function told(values, digits, unit = '') {
  const { median, min, max } = spread(values);
  return values.length === 1 ? `${median.toFixed(digits)}${unit}` : `${median.toFixed(digits)}${unit} (${min.toFixed(digits)}–${max.toFixed(digits)})`;
}

export function formatFloor(r) {
  const rounds = r.rounds;
  const mark = (ok) => (ok ? 'meets' : 'MISSES');
  const med = (values) => spread(values).median;
  const floorS = rounds.map((x) => x.floor.cpuS);
  const allRatio = rounds.map((x) => x.mapAll.cpuS / x.floor.cpuS);
  const leanRatio = rounds.map((x) => x.mapLean.cpuS / x.floor.cpuS);
  const peakAll = rounds.map((x) => x.mapAll.peakMiB);
  const small = rounds.map((x) => x.series.small.perFrameS);
  const big = rounds.map((x) => x.series.big.perFrameS);
  const throughput = rounds.filter((x) => x.series.big.wall2S).map((x) => x.series.big.wall1S / x.series.big.wall2S);
  const pair = rounds.filter((x) => x.series.big.pairS).map((x) => (2 * x.series.big.wall1S) / x.series.big.pairS);
  const s = rounds[0].series;
  const lines = [
    `photo ${r.width}×${r.height} (${((r.width * r.height) / 1e6).toFixed(0)} MP), CPU seconds (user + system, all threads), one child each; ` +
      `${rounds.length} round(s) of every measurement, one after another: each figure is the median over the rounds (range in brackets), each ratio taken within its round`,
    `floor (decode + 32³ table read per pixel + one float32 .npy): ${told(floorS, 2, ' s')} CPU, peak ${told(rounds.map((x) => x.floor.peakMiB), 0, ' MiB')}`,
    `map, default outputs, --threads 1: ${told(rounds.map((x) => x.mapAll.cpuS), 2, ' s')} CPU = ${told(allRatio, 2, '×')} the floor (target ≤ 3×: ${mark(med(allRatio) <= 3)}), peak ${told(peakAll, 0, ' MiB')} (target ≤ 600: ${mark(med(peakAll) <= 600)})`,
  ];
  if (rounds[0].huge) {
    const hugeMap = rounds.map((x) => x.huge.map.cpuS);
    lines.push(
      `with GLIBC_TUNABLES=${HUGE_PAGES} (information, no target): floor ${told(rounds.map((x) => x.huge.floor.cpuS), 2, ' s')} CPU, map with default outputs ${told(hugeMap, 2, ' s')} CPU (${told(rounds.map((x) => x.huge.map.cpuS / x.mapAll.cpuS), 2, '×')} the map without; ${told(rounds.map((x) => x.huge.map.cpuS / x.huge.floor.cpuS), 2, '×')} its floor), peak ${told(rounds.map((x) => x.huge.map.peakMiB), 0, ' MiB')}`,
    );
  }
  lines.push(
    `map --outputs npy,json: ${told(rounds.map((x) => x.mapLean.cpuS), 2, ' s')} CPU = ${told(leanRatio, 2, '×')} the floor (target ≤ 2×: ${mark(med(leanRatio) <= 2)}), peak ${told(rounds.map((x) => x.mapLean.peakMiB), 0, ' MiB')}`,
    `series 320×240: ${told(small, 3, ' s')} CPU per frame over ${s.small.frames} frames (target ≤ 0.25: ${mark(med(small) <= 0.25)})`,
    `series 2 MP: ${told(big, 3, ' s')} CPU per frame over ${s.big.frames} frames (target ≤ 0.7: ${mark(med(big) <= 0.7)})`,
    `series 2 MP, 2 workers against 1: ${throughput.length === 0 ? '–' : told(throughput, 2, '×')} the throughput (wall ${told(rounds.map((x) => x.series.big.wall1S), 1, ' s')} → ${told(rounds.filter((x) => x.series.big.wall2S).map((x) => x.series.big.wall2S), 1, ' s')}; target ≥ 1.7×: ${mark(throughput.length > 0 && med(throughput) >= 1.7)})`,
  );
  if (pair.length > 0) {
    lines.push(
      `(information) two independent 1-worker runs of the same frames at once: ${told(pair, 2, '×')} the throughput of one alone (wall ${told(rounds.filter((x) => x.series.big.pairS).map((x) => x.series.big.pairS), 1, ' s')} for both): this machine's ceiling for two workers`,
    );
  }
  // A bound from CPU time alone: on C cores, a run that used T s of CPU cannot end in less than
  // T / C s of wall time, so 2 workers' throughput is at most C × (1 worker's wall) ÷ (2 workers'
  // CPU) times 1 worker's. Two workers use more CPU than one on the same frames: each warms up on
  // its own (V8 compiles the hot functions in every isolate; a worker's first 2-MP frame costs
  // 2–4× a later one), each chunk's first frame has no previous frame, and two busy cores slow
  // each other (memory).
  const both = rounds.filter((x) => x.series.big.cpu2S);
  if (both.length > 0) {
    const cores = availableParallelism();
    lines.push(
      `(information) CPU of 2 workers ÷ CPU of 1 on the same ${s.big.frames} frames: ${told(both.map((x) => x.series.big.cpu2S / x.series.big.cpu1S), 2, '×')}; ` +
        `so on ${cores} cores 2 workers can reach at most ${told(both.map((x) => (cores * x.series.big.wall1S) / x.series.big.cpu2S), 2, '×')} the throughput of 1 here`,
    );
  }
  const longRounds = rounds.filter((x) => x.series.long && x.series.big.wall2S);
  if (longRounds.length > 0) {
    const marginal = (x) => (x.series.long.wall1S - x.series.big.wall1S) / (x.series.long.wall2S - x.series.big.wall2S);
    const extra = longRounds[0].series.long.frames - longRounds[0].series.big.frames;
    lines.push(
      `(information) long series: the ${extra} frames a ${longRounds[0].series.long.frames}-frame run maps beyond the ${longRounds[0].series.big.frames} above (the same first frames; start-up and warm-up cancel): ` +
        `1 worker ${told(longRounds.map((x) => x.series.long.wall1S - x.series.big.wall1S), 1, ' s')}, 2 workers ${told(longRounds.map((x) => x.series.long.wall2S - x.series.big.wall2S), 1, ' s')} of wall time: ` +
        `${told(longRounds.map(marginal), 2, '×')} the throughput of 1`,
    );
  }
  return lines.join('\n');
}

if (process.argv[2] === '--floor') await floorChild(process.argv[3], process.argv[4]);
else if (process.argv[1] === SELF) console.log(formatFloor(await benchFloor()));
