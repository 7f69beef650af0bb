/**
 * Orchestration of `runSeries` with a test double in place of the thickness mapper: ordering,
 * chunking, priors within chunks, resume, settings changes, shards + aggregation, interrupts,
 * bad frames. The double reads a number from each frame file and returns a uniform map of that
 * thickness, so every call, its prior and every CSV row can be checked exactly. (Invented data:
 * these frames are text files, read through an injected header reader.)
 */
import { describe, expect, it, beforeEach, afterEach } from 'vitest';
import { mkdtemp, mkdir, readFile, readdir, rm, writeFile, unlink } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { runSeries, type SeriesOptions } from '../src/series/runSeries.js';
import type { FrameProcessor } from '../src/series/types.js';
import type { MapResult } from '../src/map/types.js';
import type { FrameHeader } from '../src/series/probeFrames.js';

const W = 4;
const H = 3;

interface Call {
  frame: string;
  prior: number | null;
}

function uniformResult(value: number, width = W, height = H): MapResult {
  const n = width * height;
  return {
    width,
    height,
    thicknessNm: new Float32Array(n).fill(value),
    confidence: new Float32Array(n).fill(1),
    status: new Uint8Array(n),
    fitted: { exposure: 6, whiteBalance: [1, 1, 1], flare: [0, 0, 0] },
    stats: {
      mean_nm: value,
      median_nm: value,
      std_nm: 0,
      min_nm: value,
      max_nm: value,
      p05_nm: value,
      p95_nm: value,
      uniformity: 0,
      coverage: 1,
      thin_fraction: value < 100 ? 1 : 0,
      thin_regions: value < 100 ? 1 : 0,
      film_area_px: n,
    },
    histogram: { edgesNm: [], counts: [] },
    thinRegions: [],
    darkLimitNm: 20,
    warnings: [],
  };
}

/** The test double's fitted exposure for a frame of thickness `value`: many digits, to test exactness. */
function exposureOf(value: number): number {
  return 6 + value / 7919;
}

/**
 * Test double: thickness = number written in the file; records the prior it was given (and, in
 * `fitStarts` when given, the exposure of the fit it was told to start from).
 */
function double(calls: Call[], options: { failOn?: string; delayMs?: number; fitStarts?: Array<number | null> } = {}): FrameProcessor {
  return {
    async map(path, prior, previousFit) {
      const frame = basename(path);
      calls.push({ frame, prior: prior === null ? null : prior[0] });
      options.fitStarts?.push(previousFit ? previousFit.exposure : null);
      if (options.delayMs) await new Promise((r) => setTimeout(r, options.delayMs));
      if (frame === options.failOn) throw new Error('cannot decode JPEG data');
      const text = await readFile(path, 'utf8');
      const [value, w, h] = text.split(' ').map(Number);
      const result = uniformResult(value, w || W, h || H);
      // Only the fit-start tests give frames distinct exposures (the others check exact CSV rows).
      return options.fitStarts ? { ...result, fitted: { ...result.fitted, exposure: exposureOf(value) } } : result;
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
  dir = await mkdtemp(join(tmpdir(), 'lamella-series-'));
  inDir = join(dir, 'in');
  outDir = join(dir, 'out');
  await mkdir(inDir);
});
afterEach(async () => {
  await rm(dir, { recursive: true, force: true });
});

/** Writes frames f1.jpg … fN.jpg (in shuffled creation order) with thickness 1000 − 20·i. */
async function makeFrames(count: number): Promise<void> {
  const order = Array.from({ length: count }, (_, i) => i + 1).sort((a, b) => ((a * 7919) % 13) - ((b * 7919) % 13));
  for (const i of order) await writeFile(join(inDir, `f${i}.jpg`), `${1000 - 20 * i}`);
}

function options(processor: FrameProcessor, extra: Partial<SeriesOptions> = {}): SeriesOptions {
  return {
    inputs: [inDir],
    outDir,
    fps: 2,
    thinBelowNm: 800,
    chunkFrames: 4,
    workers: 0,
    mapSettings: { stack: 'soap', light: 'D65' },
    processor,
    readHeader: headerOf,
    ...extra,
  };
}

const csv = () => readFile(join(outDir, 'series.csv'), 'utf8');

describe('runSeries() with a test-double mapper', () => {
  it('maps frames in natural order of their names and writes one CSV row per frame', async () => {
    await makeFrames(12);
    const calls: Call[] = [];
    await runSeries(options(double(calls)));
    expect(calls.map((c) => c.frame)).toEqual(Array.from({ length: 12 }, (_, i) => `f${i + 1}.jpg`));
    const lines = (await csv()).trim().split('\n');
    expect(lines[0]).toBe('frame,time_s,mean_nm,median_nm,min_nm,max_nm,std_nm,thin_fraction,thin_regions,coverage,film_area_px,exposure');
    expect(lines[1]).toBe('f1.jpg,0.000,980.00,980.00,980.00,980.00,0.00,0.0000,0,1.0000,12,6.0000');
    expect(lines[12]).toBe('f12.jpg,5.500,760.00,760.00,760.00,760.00,0.00,0.0000,0,1.0000,12,6.0000');
  });

  it('passes the previous frame map as prior within a chunk and none at chunk starts', async () => {
    await makeFrames(10);
    const calls: Call[] = [];
    await runSeries(options(double(calls)));
    const priors = calls.map((c) => c.prior);
    // chunks of 4: f1–f4, f5–f8, f9–f10
    expect(priors).toEqual([null, 980, 960, 940, null, 900, 880, 860, null, 820]);
  });

  it("starts each frame's photo-formation fit from the previous frame's fit within a chunk, from scratch at chunk starts", async () => {
    await makeFrames(10);
    const fitStarts: Array<number | null> = [];
    await runSeries(options(double([], { fitStarts })));
    const e = (value: number) => exposureOf(value);
    // Frame fN holds 1000 − 20·N nm; chunks of 4: f1–f4, f5–f8, f9–f10.
    expect(fitStarts).toEqual([null, e(980), e(960), e(940), null, e(900), e(880), e(860), null, e(820)]);
  });

  it('a redone frame starts from the fit stored with its predecessor, exactly (JSON keeps every double)', async () => {
    await makeFrames(6);
    await runSeries(options(double([], { fitStarts: [] })));
    await unlink(join(outDir, 'frames', 'f3.json'));
    const fitStarts: Array<number | null> = [];
    await runSeries(options(double([], { fitStarts })));
    expect(fitStarts).toEqual([exposureOf(960)]);
  });

  it('skips frames done with the same settings on a rerun, and the CSV is unchanged', async () => {
    await makeFrames(6);
    await runSeries(options(double([])));
    const first = await csv();
    const calls: Call[] = [];
    const result = await runSeries(options(double(calls)));
    expect(calls).toEqual([]);
    expect(result.events.every((e) => e.outcome === 'skipped')).toBe(true);
    expect(await csv()).toBe(first);
  });

  it('redoes a missing frame with the stored map of its predecessor as prior', async () => {
    await makeFrames(6);
    await runSeries(options(double([])));
    await unlink(join(outDir, 'frames', 'f3.json'));
    const calls: Call[] = [];
    await runSeries(options(double(calls)));
    expect(calls).toEqual([{ frame: 'f3.jpg', prior: 960 }]);
  });

  it('redoes every frame when a setting that shapes the maps changes', async () => {
    await makeFrames(5);
    await runSeries(options(double([])));
    const calls: Call[] = [];
    await runSeries(options(double(calls), { mapSettings: { stack: 'soap', light: 'F11' } }));
    expect(calls).toHaveLength(5);
  });

  it('redoes every frame when the calibration changes, and records the calibration in series.json', async () => {
    await makeFrames(3);
    await runSeries(options(double([])));
    const calls: Call[] = [];
    const calibration = { fitted: { exposure: 6.1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] } };
    await runSeries(options(double(calls), { calibration }));
    expect(calls).toHaveLength(3);
    // series.json states it in the records' snake_case.
    expect(JSON.parse(await readFile(join(outDir, 'series.json'), 'utf8')).calibration).toEqual({ fitted: { exposure: 6.1, white_balance: [1, 1, 1], flare: [0, 0, 0] } });
  });

  it('two shards plus an aggregation run give the same series.csv and series.json as one run, byte for byte', async () => {
    await makeFrames(11);
    await runSeries(options(double([])));
    const singleCsv = await csv();
    const singleJson = await readFile(join(outDir, 'series.json'), 'utf8');
    await rm(outDir, { recursive: true });
    const calls1: Call[] = [];
    const calls2: Call[] = [];
    await runSeries(options(double(calls1), { shard: { index: 1, count: 2 } }));
    await runSeries(options(double(calls2), { shard: { index: 2, count: 2 } }));
    expect(calls1.length + calls2.length).toBe(11);
    expect(calls1.map((c) => c.frame)).toEqual(['f1.jpg', 'f2.jpg', 'f3.jpg', 'f4.jpg']);
    const calls3: Call[] = [];
    await runSeries(options(double(calls3), { aggregateOnly: true }));
    expect(calls3).toEqual([]);
    expect(await csv()).toBe(singleCsv);
    expect(await readFile(join(outDir, 'series.json'), 'utf8')).toBe(singleJson);
  });

  it('a shard run clears stale partial work of its own frames only (shards may share OUT at the same time)', async () => {
    await makeFrames(8);
    const frames = join(outDir, 'frames');
    await mkdir(frames, { recursive: true });
    await mkdir(join(frames, '.partial-999-1-f2'));
    await mkdir(join(frames, '.partial-999-1-f7'));
    await writeFile(join(frames, 'f7.thickness.npy'), 'orphan from an interrupted run');
    await runSeries(options(double([]), { shard: { index: 1, count: 2 } }));
    let names = await readdir(frames);
    expect(names).not.toContain('.partial-999-1-f2');
    expect(names).toContain('.partial-999-1-f7');
    expect(names).toContain('f7.thickness.npy');
    await runSeries(options(double([]), { shard: { index: 2, count: 2 } }));
    names = await readdir(frames);
    expect(names.filter((n) => n.startsWith('.'))).toEqual([]);
    expect(names).toContain('f7.json');
  });

  it('an interrupt stops between frames, leaves no partial files, and a rerun completes the series', async () => {
    await makeFrames(9);
    await runSeries(options(double([])));
    const reference = await csv();
    await rm(outDir, { recursive: true });
    const controller = new AbortController();
    const result = await runSeries(
      options(double([]), {
        signal: controller.signal,
        onFrame: (_e, progress) => {
          if (progress.mapped === 3) controller.abort();
        },
      }),
    );
    expect(result.interrupted).toBe(true);
    const names = await readdir(join(outDir, 'frames'));
    expect(names.filter((n) => n.startsWith('.'))).toEqual([]);
    expect(names.filter((n) => n.endsWith('.json')).sort()).toEqual(['f1.json', 'f2.json', 'f3.json']);
    expect(names.filter((n) => n.endsWith('.thickness.npy'))).toHaveLength(3);
    expect(names.filter((n) => n.endsWith('.status.npy'))).toHaveLength(3);
    const calls: Call[] = [];
    const rerun = await runSeries(options(double(calls)));
    expect(rerun.interrupted).toBe(false);
    expect(calls.map((c) => c.frame)).toEqual(['f4.jpg', 'f5.jpg', 'f6.jpg', 'f7.jpg', 'f8.jpg', 'f9.jpg']);
    expect(calls[0].prior).toBe(940);
    expect(await csv()).toBe(reference);
  });

  it('reports a frame that fails to map by name, maps the rest, and starts the next frame without prior', async () => {
    await makeFrames(4);
    const calls: Call[] = [];
    const result = await runSeries(options(double(calls, { failOn: 'f2.jpg' })));
    expect(result.failures).toEqual(['f2.jpg: cannot decode JPEG data']);
    expect(calls.find((c) => c.frame === 'f3.jpg')!.prior).toBeNull();
    expect((await csv()).trim().split('\n')).toHaveLength(4);
  });

  it('rejects an unreadable frame and a frame of another size before mapping, naming them', async () => {
    await makeFrames(4);
    await writeFile(join(inDir, 'f5.jpg'), 'garbage');
    await writeFile(join(inDir, 'f6.jpg'), '880 8 6');
    const calls: Call[] = [];
    const result = await runSeries(options(double(calls)));
    expect(calls.map((c) => c.frame)).toEqual(['f1.jpg', 'f2.jpg', 'f3.jpg', 'f4.jpg']);
    expect(result.failures).toHaveLength(2);
    expect(result.failures[0]).toMatch(/f5\.jpg.*unsupported image format/);
    expect(result.failures[1]).toBe("f6.jpg: size 8x6 differs from the series' 4x3; skipped");
  });

  it('leaves out inputs inside OUT/frames (e.g. previews caught by a broad pattern), with a warning', async () => {
    await makeFrames(2);
    await mkdir(join(outDir, 'frames'), { recursive: true });
    await writeFile(join(outDir, 'frames', 'old.jpg'), '500');
    const calls: Call[] = [];
    const result = await runSeries(options(double(calls), { inputs: [inDir, join(outDir, 'frames', '*.jpg')] }));
    expect(calls.map((c) => c.frame)).toEqual(['f1.jpg', 'f2.jpg']);
    expect(result.warnings).toContain("1 input file(s) inside the output folder's frames/ were left out");
  });

  it('throws a RangeError naming the inputs when they hold no frames', async () => {
    await expect(runSeries(options(double([])))).rejects.toThrow(/^inputs \/.*\/in: no image frames found \(input folder .*in holds no image files/);
  });

  it('throws a RangeError when frames have no EXIF time and neither fps nor interval is given', async () => {
    await makeFrames(2);
    await expect(runSeries(options(double([]), { fps: null }))).rejects.toThrow(/no frame has an EXIF capture time.*fps or intervalS/);
  });
});
