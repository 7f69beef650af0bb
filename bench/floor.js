// CPU time of `lamella map` and `lamella series` against a floor built in the same run (issue 18):
//
//   floor — decode the 12-MP JPEG with sharp, look each pixel up in a 32³ colour table (one read
//           per pixel), write one float32 .npy (atomically, with fsync, as the tool writes);
//   map   — `lamella map PHOTO --stack soap-film --out DIR --quiet --threads 1`, default outputs;
//   map npy,json — the same with `--outputs npy,json`;
//   series — `lamella series` over 320×240 and 2-MP frames with 1 worker (CPU per frame: the run's
//           CPU less a one-frame run's, over the extra frames) and the 2-MP run's wall time with
//           1 and 2 workers (throughput ratio), in chunks of half the frames so that each worker has one.
// Each is one child process run under GNU time (user + system CPU seconds, all threads, and the
// peak resident memory), so node's start-up and module loading count in every figure alike.
// Photos: the demo's invented draining soap film (scripts/make-demo.js), JPEG quality 90, 4:2:0.
// Targets (issue 18): map ≤ 3× the floor's CPU and ≤ 600 MiB; npy,json ≤ 2×; a 320×240 series
// frame ≤ 0.25 s CPU, a 2-MP frame ≤ 0.7 s; 2 workers ≥ 1.7× the throughput of 1 on 2-MP frames.
// Run after building: `node bench/floor.js` (or through bench/run.js).
import { spawn, spawnSync } from 'node:child_process';
import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
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

async function seriesFrames(dir, name, count, width, height) {
  const folder = join(dir, name);
  await mkdir(folder);
  for (let i = 0; i < count; i++) await photoAt(folder, `f${String(i).padStart(3, '0')}.jpg`, i * 4, width, height);
  return folder;
}

export async function benchFloor({ width = 4000, height = 3000, smallFrames = 12, bigFrames = 6 } = {}) {
  const dir = await mkdtemp(join(tmpdir(), 'lamella-bench-floor-'));
  try {
    const photo = await photoAt(dir, 'film.jpg', 8, width, height);
    const floor = timed([SELF, '--floor', photo, join(dir, 'floor.npy')], 'floor');
    const mapAll = timed([CLI, 'map', photo, '--stack', 'soap-film', '--out', join(dir, 'all'), '--quiet', '--threads', '1'], 'map');
    // The same map with glibc's malloc asking for transparent huge pages (README, "Accuracy and
    // speed"): for information, on Linux with glibc 2.35 or later; not a target.
    const hugeEnv = { ...process.env, GLIBC_TUNABLES: HUGE_PAGES };
    const huge = process.platform === 'linux'
      ? {
          floor: timed([SELF, '--floor', photo, join(dir, 'floor-huge.npy')], 'floor huge pages', hugeEnv),
          map: timed([CLI, 'map', photo, '--stack', 'soap-film', '--out', join(dir, 'huge'), '--quiet', '--threads', '1'], 'map huge pages', hugeEnv),
        }
      : null;
    const mapLean = timed([CLI, 'map', photo, '--stack', 'soap-film', '--out', join(dir, 'lean'), '--quiet', '--threads', '1', '--outputs', 'npy,json'], 'map npy,json');
    const series = {};
    for (const [key, frames, w, h] of [['small', smallFrames, 320, 240], ['big', bigFrames, 1632, 1224]]) {
      const folder = await seriesFrames(dir, key, frames, w, h);
      // Chunks of half the frames, so that two workers have a chunk each (a chunk is the unit of work).
      const base = ['series', '--stack', 'soap-film', '--fps', '2', '--quiet', '--no-report', '--chunk-frames', String(Math.ceil(frames / 2))];
      const one = timed([CLI, ...base, join(folder, 'f000.jpg'), '--out', join(dir, `${key}-1f`), '--workers', '1'], `series ${key} 1 frame`);
      const all = timed([CLI, ...base, folder, '--out', join(dir, `${key}-w1`), '--workers', '1'], `series ${key}`);
      const perFrameS = (all.cpuS - one.cpuS) / (frames - 1);
      const two = key === 'big' ? timed([CLI, ...base, folder, '--out', join(dir, `${key}-w2`), '--workers', '2'], `series ${key} 2 workers`) : null;
      // Two independent one-worker runs at once (information): what two processes get from this machine.
      const pairS = key === 'big'
        ? await wallOfPair([CLI, ...base, folder, '--out', join(dir, `${key}-pa`), '--workers', '1'], [CLI, ...base, folder, '--out', join(dir, `${key}-pb`), '--workers', '1'])
        : null;
      series[key] = { frames, width: w, height: h, perFrameS, wall1S: all.wallS, wall2S: two?.wallS ?? null, pairS };
    }
    return { width, height, floor, mapAll, huge, mapLean, series };
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

export function formatFloor(r) {
  const ratio = (x) => `${(x.cpuS / r.floor.cpuS).toFixed(2)}×`;
  const mark = (ok) => (ok ? 'meets' : 'MISSES');
  const s = r.series;
  const throughput = s.big.wall2S ? s.big.wall1S / s.big.wall2S : null;
  return [
    `photo ${r.width}×${r.height} (${((r.width * r.height) / 1e6).toFixed(0)} MP), CPU seconds (user + system, all threads), one child each`,
    `floor (decode + 32³ table read per pixel + one float32 .npy): ${r.floor.cpuS.toFixed(2)} s CPU, peak ${r.floor.peakMiB.toFixed(0)} MiB`,
    `map, default outputs, --threads 1: ${r.mapAll.cpuS.toFixed(2)} s CPU = ${ratio(r.mapAll)} the floor (target ≤ 3×: ${mark(r.mapAll.cpuS <= 3 * r.floor.cpuS)}), peak ${r.mapAll.peakMiB.toFixed(0)} MiB (target ≤ 600: ${mark(r.mapAll.peakMiB <= 600)})`,
    ...(r.huge
      ? [`with GLIBC_TUNABLES=${HUGE_PAGES} (information, no target): floor ${r.huge.floor.cpuS.toFixed(2)} s CPU, map with default outputs ${r.huge.map.cpuS.toFixed(2)} s CPU (${(r.huge.map.cpuS / r.mapAll.cpuS).toFixed(2)}× the map without; ${(r.huge.map.cpuS / r.huge.floor.cpuS).toFixed(2)}× its floor), peak ${r.huge.map.peakMiB.toFixed(0)} MiB`]
      : []),
    `map --outputs npy,json: ${r.mapLean.cpuS.toFixed(2)} s CPU = ${ratio(r.mapLean)} the floor (target ≤ 2×: ${mark(r.mapLean.cpuS <= 2 * r.floor.cpuS)}), peak ${r.mapLean.peakMiB.toFixed(0)} MiB`,
    `series 320×240: ${s.small.perFrameS.toFixed(3)} s CPU per frame over ${s.small.frames} frames (target ≤ 0.25: ${mark(s.small.perFrameS <= 0.25)})`,
    `series 2 MP: ${s.big.perFrameS.toFixed(3)} s CPU per frame over ${s.big.frames} frames (target ≤ 0.7: ${mark(s.big.perFrameS <= 0.7)})`,
    `series 2 MP, 2 workers against 1: ${throughput === null ? '–' : `${throughput.toFixed(2)}×`} the throughput (wall ${s.big.wall1S.toFixed(1)} s → ${s.big.wall2S?.toFixed(1)} s; target ≥ 1.7×: ${mark(throughput !== null && throughput >= 1.7)})`,
    ...(s.big.pairS
      ? [`(information) two independent 1-worker runs of the same frames at once: ${((2 * s.big.wall1S) / s.big.pairS).toFixed(2)}× the throughput of one alone (wall ${s.big.pairS.toFixed(1)} s for both): this machine's ceiling for two workers`]
      : []),
  ].join('\n');
}

if (process.argv[2] === '--floor') await floorChild(process.argv[3], process.argv[4]);
else if (process.argv[1] === SELF) console.log(formatFloor(await benchFloor()));
