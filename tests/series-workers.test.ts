/**
 * The worker-thread path of a series (`node:worker_threads`), run from the compiled `dist/`
 * (workers load JavaScript; `npm test` builds first). The mapper is a test double written as an
 * ES module into a temp folder: each frame file holds a number, the map is uniform at that value.
 */
import { describe, expect, it, beforeEach, afterEach } from 'vitest';
import { existsSync } from 'node:fs';
import { mkdtemp, mkdir, readFile, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type * as RunSeriesModule from '../src/series/runSeries.js';
import type { FrameHeader } from '../src/series/probeFrames.js';

const distModule = new URL('../dist/series/runSeries.js', import.meta.url);

const DOUBLE = `
import { readFile, appendFile } from 'node:fs/promises';
import { basename } from 'node:path';
export async function createFrameProcessor(config) {
  return {
    async map(path, prior) {
      await appendFile(config.log, basename(path) + ' ' + (prior ? prior[0] : 'none') + '\\n');
      if (config.delayMs) await new Promise((r) => setTimeout(r, config.delayMs));
      const value = Number(await readFile(path, 'utf8'));
      const n = 12;
      const stats = { mean_nm: value, median_nm: value, std_nm: 0, min_nm: value, max_nm: value, p05_nm: value,
        p95_nm: value, uniformity: 0, coverage: 1, thin_fraction: value < 500 ? 1 : 0, thin_regions: value < 500 ? 1 : 0 };
      return { width: 4, height: 3, thicknessNm: new Float32Array(n).fill(value), confidence: new Float32Array(n).fill(1),
        status: new Uint8Array(n), fitted: { exposure: 6, whiteBalance: [1, 1, 1], flare: [0, 0, 0] }, stats,
        histogram: { edgesNm: [], counts: [] }, thinRegions: [], darkLimitNm: 20, warnings: [] };
    },
  };
}
`;

let dir: string;
let outDir: string;
let modUrl: string;
let log: string;

beforeEach(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-workers-'));
  outDir = join(dir, 'out');
  await mkdir(join(dir, 'in'));
  for (let i = 1; i <= 14; i++) await writeFile(join(dir, 'in', `frame${i}.png`), String(1000 - 30 * i));
  await writeFile(join(dir, 'double.mjs'), DOUBLE);
  modUrl = pathToFileURL(join(dir, 'double.mjs')).href;
  log = join(dir, 'calls.log');
});
afterEach(async () => {
  await rm(dir, { recursive: true, force: true });
});

const header = async (): Promise<FrameHeader> => ({ width: 4, height: 3, exifTimeMs: null });

async function load(): Promise<typeof RunSeriesModule> {
  if (!existsSync(distModule)) throw new Error('dist/ is missing: run `npx tsc -p tsconfig.build.json` (npm test does) before this suite');
  return (await import(distModule.href)) as typeof RunSeriesModule;
}

function base(extra: Partial<RunSeriesModule.SeriesOptions> = {}): RunSeriesModule.SeriesOptions {
  return {
    inputs: [join(dir, 'in')], outDir, fps: 2, thinBelowNm: 600, chunkFrames: 3, workers: 2,
    mapSettings: { stack: 'double' }, processor: { moduleUrl: modUrl, config: { log } }, readHeader: header, report: false,
    ...extra,
  };
}

describe('runSeries() on worker threads', () => {
  it('two workers give the same series.csv as one worker, with priors only inside chunks', async () => {
    const { runSeries } = await load();
    await runSeries(base({ workers: 1 }));
    const one = await readFile(join(outDir, 'series.csv'), 'utf8');
    await rm(outDir, { recursive: true });
    await rm(log);
    await runSeries(base({ workers: 2 }));
    expect(await readFile(join(outDir, 'series.csv'), 'utf8')).toBe(one);
    const calls = new Map((await readFile(log, 'utf8')).trim().split('\n').map((l) => l.split(' ') as [string, string]));
    expect(calls.size).toBe(14);
    expect(calls.get('frame1.png')).toBe('none');
    expect(calls.get('frame2.png')).toBe('970');
    expect(calls.get('frame4.png')).toBe('none');
    expect(calls.get('frame13.png')).toBe('none');
    expect(calls.get('frame14.png')).toBe('610');
  });

  it('an abort terminates the workers mid-frame, leaves no partial files, and a rerun completes', async () => {
    const { runSeries } = await load();
    await runSeries(base({ workers: 1, processor: { moduleUrl: modUrl, config: { log } } }));
    const reference = await readFile(join(outDir, 'series.csv'), 'utf8');
    await rm(outDir, { recursive: true });
    const controller = new AbortController();
    const result = await runSeries(
      base({
        processor: { moduleUrl: modUrl, config: { log, delayMs: 40 } },
        signal: controller.signal,
        onFrame: (_e, p) => {
          if (p.mapped >= 4) controller.abort();
        },
      }),
    );
    expect(result.interrupted).toBe(true);
    const names = await readdir(join(outDir, 'frames'));
    expect(names.filter((n) => n.startsWith('.'))).toEqual([]);
    const records = names.filter((n) => n.endsWith('.json')).map((n) => n.slice(0, -5));
    const maps = names.filter((n) => n.endsWith('.thickness.npy')).map((n) => n.slice(0, -'.thickness.npy'.length));
    expect(maps.sort()).toEqual(records.sort());
    expect(records.length).toBeGreaterThanOrEqual(4);
    expect(records.length).toBeLessThan(14);
    expect(existsSync(join(outDir, 'series.csv'))).toBe(false);
    const rerun = await runSeries(base());
    expect(rerun.interrupted).toBe(false);
    expect(rerun.events.filter((e) => e.outcome === 'mapped').length).toBe(14 - records.length);
    expect(await readFile(join(outDir, 'series.csv'), 'utf8')).toBe(reference);
  });
});
