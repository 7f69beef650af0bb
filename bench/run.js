// `npm run bench`: every speed benchmark in turn, then one readable summary.
//   optics  — filmSpectra() on 401 wavelengths × 8,000 thicknesses per preset (bench/optics.js)
//   colour  — chart table and a 12-MP render against sharp's JPEG encode (bench/colour.js)
//   map     — `lamella map` end to end against sharp's decode, peak memory, 1–12 MP scaling, and the
//             12 MP photo under uneven light against it evenly lit (bench/map.js)
//   series  — `lamella series` frames per second with 1 and 2 workers (bench/series.js, if present)
//   floor   — CPU time of map and series against the floor of issue 18: decode + a 32³ table
//             read per pixel + one float32 .npy, with each target and whether it is met (bench/floor.js)
// Times are wall clock on this machine in this run; ratios against the codec are measured in the
// same run so that they travel better between machines than the times do.
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { benchOptics } from './optics.js';
import { benchColour } from './colour.js';
import { benchMap, formatMap } from './map.js';
import { benchFloor, formatFloor } from './floor.js';

const here = (name) => fileURLToPath(new URL(name, import.meta.url));
const started = performance.now();
const sections = [];

async function section(title, work) {
  const t0 = performance.now();
  process.stderr.write(`bench: ${title}…\n`);
  try {
    const text = await work();
    sections.push(`${title} (${((performance.now() - t0) / 1000).toFixed(0)} s)\n${text}`);
  } catch (error) {
    sections.push(`${title}: FAILED — ${error instanceof Error ? error.message : String(error)}`);
    process.exitCode = 1;
  }
}

await section('optics: filmSpectra, 401 wavelengths × 8,000 thicknesses, 20°, unpolarised', async () => {
  const r = benchOptics();
  return r.results.map((x) => `  ${x.preset.padEnd(20)} ${x.ms.toFixed(1).padStart(8)} ms`).join('\n');
});

await section('colour: chart table and 12-MP render', async () => {
  const r = await benchColour();
  return [
    `  chart table ${r.chart.thicknesses} thicknesses × ${r.chart.wavelengths} wavelengths: ${r.chart.ms.toFixed(0)} ms`,
    `  render ${r.render.width}×${r.render.height}: ${r.render.renderMs.toFixed(0)} ms (with noise ${r.render.noiseRenderMs.toFixed(0)} ms); JPEG encode ${r.render.jpegMs.toFixed(0)} ms; render ÷ encode ${r.render.ratio.toFixed(2)}× (target < 3×)`,
  ].join('\n');
});

await section('map: lamella map end to end vs sharp decode (invented draining soap film, JPEG 90)', async () => formatMap(await benchMap()));

if (existsSync(here('./series.js'))) {
  await section('series: lamella series, 2-MP frames', async () => {
    const { benchSeries } = await import('./series.js');
    const r = await benchSeries();
    return [
      `  ${r.frames} frames of ${r.width}×${r.height}; in-process map with the previous frame ${r.singleMapMs.toFixed(0)} ms, alone ${r.coldMapMs.toFixed(0)} ms (warm/cold ${(r.singleMapMs / r.coldMapMs).toFixed(2)})`,
      ...r.results.map((x) => `  ${x.workers} worker(s): ${x.framesPerSecond.toFixed(2)} frames/s (${x.seconds.toFixed(1)} s)`),
      ...r.video.map((x) => `  as an H.264 video, ${x.workers} worker(s): ${x.framesPerSecond.toFixed(2)} frames/s (${x.seconds.toFixed(1)} s)`),
      `  series overhead per frame over a single map (1 worker): ${r.overheadMsPerFrame.toFixed(0)} ms`,
    ].join('\n');
  });
}

await section('floor: CPU time against decode + 32³ table + one .npy (issue 18 targets)', async () =>
  formatFloor(await benchFloor()).split('\n').map((line) => `  ${line}`).join('\n'),
);

console.log(`\nLamella benchmarks — ${new Date().toISOString()}, Node ${process.version}, total ${((performance.now() - started) / 1000).toFixed(0)} s\n`);
console.log(sections.join('\n\n'));
