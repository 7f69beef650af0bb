/**
 * Honest frame counts (issue 16 item 3): every frame found in the inputs is counted exactly once —
 * in series.json (`frames`: inputs, unreadable, outside_selection, total, with_results, missing) and
 * in the summary's count line (mapped, already done, failed, without a result; the inputs' frames
 * outside the series apart). Bookkeeping of our own, checked against the frames the test makes
 * (invented: text files read through an injected header reader, mapped by a test double that
 * returns a uniform map of the thickness written in the file); no outside source applies. The bad
 * options at the end are checked on the CLI (usage errors exit 2 naming the option: the project's
 * rule, common practice for command-line tools).
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runSeries, type SeriesOptions } from '../src/series/runSeries.js';
import { countLine } from '../src/series/summaryText.js';
import type { FrameProcessor } from '../src/series/types.js';
import type { MapResult } from '../src/map/types.js';
import type { FrameHeader } from '../src/series/probeFrames.js';

const W = 4;
const H = 3;

function uniformResult(value: number): MapResult {
  const n = W * H;
  return {
    width: W,
    height: H,
    thicknessNm: new Float32Array(n).fill(value),
    confidence: new Float32Array(n).fill(1),
    status: new Uint8Array(n),
    fitted: { exposure: 6, whiteBalance: [1, 1, 1], flare: [0, 0, 0] },
    stats: {
      mean_nm: value, median_nm: value, std_nm: 0, min_nm: value, max_nm: value, p05_nm: value, p95_nm: value,
      uniformity: 0, coverage: 1, thin_fraction: 0, thin_regions: 0, film_area_px: n,
    },
    histogram: { edgesNm: [], counts: [] },
    thinRegions: [],
    darkLimitNm: 20,
    warnings: [],
  };
}

/** Thickness = the number written in the frame file; fails on the frames named in `failOn`. */
function double(failOn: ReadonlySet<string>): FrameProcessor {
  return {
    async map(path) {
      if (failOn.has(basename(path))) throw new Error('cannot decode JPEG data');
      return uniformResult(Number((await readFile(path, 'utf8')).split(' ')[0]));
    },
  };
}

async function headerOf(path: string): Promise<FrameHeader> {
  const text = await readFile(path, 'utf8');
  if (text.startsWith('garbage')) throw new Error(`${path}: unsupported image format`);
  const [, w, h] = text.split(' ').map(Number);
  return { width: w || W, height: h || H, exifTimeMs: null };
}

let dir: string;
let inDir: string;
let outDir: string;

beforeEach(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-counts-'));
  inDir = join(dir, 'in');
  outDir = join(dir, 'out');
  await mkdir(inDir);
});
afterEach(async () => {
  await rm(dir, { recursive: true, force: true });
});

function options(processor: FrameProcessor, extra: Partial<SeriesOptions> = {}): SeriesOptions {
  return {
    inputs: [inDir], outDir, fps: 2, thinBelowNm: 100, chunkFrames: 3, workers: 0,
    mapSettings: { stack: 'soap', light: 'D65' }, processor, readHeader: headerOf, report: false, ...extra,
  };
}

/** f1 … f8 at 0, 0.5, … 3.5 s; f3 unreadable, f5 of another size. */
async function makeInputs(): Promise<void> {
  for (let i = 1; i <= 8; i++) await writeFile(join(inDir, `f${i}.jpg`), `${1000 - 20 * i}`);
  await writeFile(join(inDir, 'f3.jpg'), 'garbage');
  await writeFile(join(inDir, 'f5.jpg'), '900 8 6');
}

async function framesOf(): Promise<Record<string, unknown>> {
  return JSON.parse(await readFile(join(outDir, 'series.json'), 'utf8')).frames;
}

describe('frame counts in series.json and the summary (test double; our own bookkeeping)', () => {
  it('counts unreadable frames, frames outside --start/--end, failed, mapped and already done frames once each', async () => {
    await makeInputs();
    const select = { startS: 0.5, endS: 3 };
    // In the series: f2 (0.5 s), f4 (1.5 s), f6 (2.5 s), f7 (3 s); f1 and f8 outside; f4 fails.
    const first = await runSeries(options(double(new Set(['f4.jpg'])), { select }));
    expect(await framesOf()).toMatchObject({ inputs: 8, unreadable: 2, outside_selection: 2, total: 4, with_results: 3, missing: ['f4.jpg'] });
    expect(countLine(first)).toBe('series: 3 frame(s) mapped, 0 already done, 1 failed (4 in the series; 8 in the inputs: 2 unreadable or of another size, 2 outside --start/--end/--every)');
    expect((await readFile(join(outDir, 'series.csv'), 'utf8')).trim().split('\n')).toHaveLength(1 + 3);
    // A rerun maps f4 (mapped now) and f6 (the frame after it in its chunk of 3 — f2, f4, f6 — had
    // no prior before: its prior changed), and reuses f2 and f7.
    const second = await runSeries(options(double(new Set()), { select }));
    expect(await framesOf()).toMatchObject({ inputs: 8, unreadable: 2, outside_selection: 2, total: 4, with_results: 4, missing: [] });
    expect(countLine(second)).toBe('series: 2 frame(s) mapped, 2 already done, 0 failed (4 in the series; 8 in the inputs: 2 unreadable or of another size, 2 outside --start/--end/--every)');
  });

  it('a shard run counts the other shards\' frames as without a result, and the aggregation counts them as done', async () => {
    for (let i = 1; i <= 6; i++) await writeFile(join(inDir, `f${i}.jpg`), `${1000 - 20 * i}`);
    const shard = await runSeries(options(double(new Set()), { shard: { index: 1, count: 2 } }));
    expect(countLine(shard)).toBe('series: 3 frame(s) mapped, 0 already done, 0 failed, 3 without a result (6 in the series)');
    const aggregate = await runSeries(options(double(new Set()), { shard: { index: 2, count: 2 } }));
    expect(countLine(aggregate)).toBe('series: 3 frame(s) mapped, 3 already done, 0 failed (6 in the series)');
    expect(await framesOf()).toMatchObject({ inputs: 6, unreadable: 0, outside_selection: 0, total: 6, with_results: 6 });
  });
});

describe('bad series options exit 2 naming the option (CLI)', () => {
  const bin = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
  const demo = fileURLToPath(new URL('../fixtures/demo', import.meta.url));
  const cases: Array<[string[], string]> = [
    [['--start', '5', '--end', '2'], '--start 5 is after --end 2'],
    [['--every', '0'], '--every'],
    [['--range', '500-100'], '--range'],
    [['--range', '100-100'], '--range'],
  ];
  for (const [args, named] of cases) {
    it(`${args.join(' ')}`, () => {
      const out = join(tmpdir(), `lamella-counts-bad-${process.pid}-${args.join('')}`);
      const r = spawnSync(process.execPath, [bin, 'series', demo, '--stack', 'soap-film', '--fps', '2', ...args, '--quiet', '--out', out], { encoding: 'utf8' });
      expect(r.status).toBe(2);
      expect(r.stderr).toContain(named);
      // Nothing written: the options are checked before any output.
      expect(existsSync(out)).toBe(false);
    });
  }
});
