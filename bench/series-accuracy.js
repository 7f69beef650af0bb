// Accuracy of `lamella series` on a synthetic draining series (INVENTED data: the demo's drainage
// model from scripts/make-demo.js, 60 frames at 5 fps, 320×240, rendered with our own forward
// model — a round trip: render, map, compare). Target: per-frame mean thickness within 5 % of the
// truth and thin fraction within 0.02 on at least 90 % of the frames.
// Truths follow the definitions of MapStatistics (src/map/types.ts): the mean is over the pixels
// with an estimate (status ok), the thin fraction is the share of true thicknesses below the
// threshold among the pixels that are ok or dark (pixels with no estimate for other reasons are
// left out, as in the statistic). The thin fraction over ALL pixels is printed as well.
// Run after building: `node bench/series-accuracy.js [frames] [WxH]`.
import { mkdir, mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeImage } from '../dist/io/writeImage.js';
import { readNpy } from '../dist/io/decodeNpy.js';
import { runSeries } from '../dist/series/runSeries.js';
import { MAP_FRAME_PROCESSOR_URL } from '../dist/series/mapFrameConfig.js';
import { DEMO, demoThickness, renderDemoFrame } from '../scripts/make-demo.js';

const FPS = 5;

export async function benchSeriesAccuracy({ frames = 60, width = 320, height = 240, workers = 2 } = {}) {
  const dir = await mkdtemp(join(tmpdir(), 'lamella-accuracy-'));
  try {
    await mkdir(join(dir, 'in'));
    for (let i = 0; i < frames; i++) {
      const { image } = renderDemoFrame(i, width, height, FPS);
      await writeImage(join(dir, 'in', `f${String(i).padStart(3, '0')}.jpg`), image, { quality: 90 });
    }
    const config = {
      stackOptions: DEMO.stackOptions, light: 'D65', whiteBalanceLight: null, thinBelowNm: DEMO.THIN_BELOW_NM,
      maxThicknessNm: 2000, filmIndexScale: null, exposureFixed: null,
    };
    const started = performance.now();
    await runSeries({
      inputs: [join(dir, 'in')], outDir: join(dir, 'out'), fps: FPS, thinBelowNm: DEMO.THIN_BELOW_NM, workers,
      mapSettings: { ...DEMO.stackOptions, light: 'D65' }, processor: { moduleUrl: MAP_FRAME_PROCESSOR_URL, config }, report: false,
    });
    const seconds = (performance.now() - started) / 1000;
    const rows = (await readFile(join(dir, 'out', 'series.csv'), 'utf8')).trim().split('\n').slice(1).map((l) => l.split(','));
    const perFrame = [];
    for (const cells of rows) {
      const index = Number(cells[0].slice(1, 4));
      const stem = cells[0].replace('.jpg', '');
      const status = (await readNpy(join(dir, 'out', 'frames', `${stem}.status.npy`))).data;
      const truth = demoThickness(index / FPS, width, height);
      let sum = 0, n = 0, thin = 0, counted = 0, thinAll = 0;
      for (let p = 0; p < truth.length; p++) {
        const v = truth[p];
        if (v < DEMO.THIN_BELOW_NM) thinAll++;
        if (status[p] === 0) { sum += v; n++; }
        if (status[p] === 0 || status[p] === 1) { counted++; if (v < DEMO.THIN_BELOW_NM) thin++; }
      }
      const trueMean = sum / n;
      const trueThin = thin / counted;
      const trueThinAll = thinAll / truth.length;
      const mean = cells[2] === '' ? Number.NaN : Number(cells[2]);
      const thinFraction = cells[7] === '' ? Number.NaN : Number(cells[7]);
      perFrame.push({ frame: cells[0], trueMean, mean, meanError: Math.abs(mean - trueMean) / trueMean, trueThin, trueThinAll, thinFraction, thinError: Math.abs(thinFraction - trueThin) });
    }
    const meanOk = perFrame.filter((f) => f.meanError <= 0.05).length / frames;
    const thinOk = perFrame.filter((f) => f.thinError <= 0.02).length / frames;
    const bothOk = perFrame.filter((f) => f.meanError <= 0.05 && f.thinError <= 0.02).length / frames;
    return { frames, mapped: rows.length, seconds, meanOk, thinOk, bothOk, target: bothOk >= 0.9, perFrame };
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const frames = Number(process.argv[2] ?? 60);
  const [width, height] = (process.argv[3] ?? '320x240').split('x').map(Number);
  const r = await benchSeriesAccuracy({ frames, width, height });
  for (const f of r.perFrame) {
    console.log(`${f.frame}  mean ${f.mean.toFixed(1)} vs ${f.trueMean.toFixed(1)} nm (${(100 * f.meanError).toFixed(1)} %)  thin ${f.thinFraction.toFixed(4)} vs ${f.trueThin.toFixed(4)} (all pixels ${f.trueThinAll.toFixed(4)})`);
  }
  console.log(`series accuracy: ${r.mapped}/${r.frames} frames mapped in ${r.seconds.toFixed(1)} s`);
  console.log(`  mean within 5 %: ${(100 * r.meanOk).toFixed(1)} % of frames; thin fraction within 0.02: ${(100 * r.thinOk).toFixed(1)} %; both: ${(100 * r.bothOk).toFixed(1)} % (target >= 90 %: ${r.target ? 'met' : 'NOT met'})`);
}
