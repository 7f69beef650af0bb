/**
 * End to end on short synthetic series (INVENTED data, rendered with our own forward model:
 * round trips). Frame times from real EXIF headers; the real mapper in this thread; the CLI on
 * worker threads with shards, aggregation and an unreadable frame. Frames are tiny (64×48) to
 * keep the suite fast.
 */
import { describe, expect, it, beforeAll, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtemp, mkdir, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { renderPhoto } from '../src/render/renderPhoto.js';
import { resolveLight } from '../src/colour/lights.js';
import { stackFromOptions } from '../src/cli/stackOptions.js';
import { writeImage } from '../src/io/writeImage.js';
import { runSeries } from '../src/series/runSeries.js';
import { createFrameProcessor } from '../src/series/mapFrameProcessor.js';
import type { MapFrameConfig } from '../src/series/mapFrameConfig.js';
import type { FrameProcessor } from '../src/series/types.js';
import type { MapResult } from '../src/map/types.js';

const W = 64;
const H = 48;
const bin = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
let dir: string;

/** Invented wedge, 300 nm at the top to 900 nm at the bottom, thinning as (1 + t/4)^(−1/2). */
function wedge(tS: number): Float32Array {
  const h = new Float32Array(W * H);
  for (let r = 0; r < H; r++) for (let c = 0; c < W; c++) h[r * W + c] = (300 + (600 * r) / (H - 1)) / Math.sqrt(1 + tS / 4);
  return h;
}

async function renderFrames(folder: string, count: number): Promise<Float32Array[]> {
  const { stack, angleRad } = stackFromOptions({ stack: 'soap-film' });
  const truths: Float32Array[] = [];
  await mkdir(folder, { recursive: true });
  for (let i = 0; i < count; i++) {
    const h = wedge(i);
    const photo = renderPhoto(h, W, H, { stack, angleRad, light: resolveLight('D65'), exposure: 6.5, flare: 0.01, noiseSigma: 0.003, seed: i + 1 });
    await writeImage(join(folder, `shot${i + 1}.jpg`), { data: photo.data, width: W, height: H, channels: 3 }, { quality: 95 });
    truths.push(h);
  }
  return truths;
}

const config: MapFrameConfig = {
  stackOptions: { stack: 'soap-film' }, light: 'D65', whiteBalanceLight: null, thinBelowNm: 250,
  maxThicknessNm: 1500, filmIndexScale: null, exposureFixed: null,
};

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-series-e2e-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('series frame times from EXIF headers (JPEGs written with EXIF by sharp)', () => {
  const still: FrameProcessor = {
    async map(): Promise<MapResult> {
      const n = 4 * 3;
      return {
        width: 4, height: 3, thicknessNm: new Float32Array(n).fill(500), confidence: new Float32Array(n).fill(1), status: new Uint8Array(n),
        fitted: { exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] },
        stats: { mean_nm: 500, median_nm: 500, std_nm: 0, min_nm: 500, max_nm: 500, p05_nm: 500, p95_nm: 500, uniformity: 0, coverage: 1, thin_fraction: 0, thin_regions: 0, film_area_px: n },
        histogram: { edgesNm: [], counts: [] }, thinRegions: [], darkLimitNm: 20, warnings: [],
      };
    },
  };
  async function jpeg(path: string, exif: Record<string, string> | null): Promise<void> {
    let image = sharp({ create: { width: 4, height: 3, channels: 3, background: '#808080' } }).jpeg();
    if (exif) image = image.withExif({ IFD2: exif });
    await writeFile(path, await image.toBuffer());
  }
  it('times frames from DateTimeOriginal + SubSecTimeOriginal, the first at 0, fps ignored with a warning', async () => {
    const folder = join(dir, 'exif');
    await mkdir(folder);
    await jpeg(join(folder, 'p1.jpg'), { DateTimeOriginal: '2025:03:01 10:00:03', SubSecTimeOriginal: '25' });
    await jpeg(join(folder, 'p2.jpg'), { DateTimeOriginal: '2025:03:01 10:00:03', SubSecTimeOriginal: '75' });
    await jpeg(join(folder, 'p3.jpg'), { DateTimeOriginal: '2025:03:01 10:00:05', SubSecTimeOriginal: '00' });
    const result = await runSeries({ inputs: [folder], outDir: join(dir, 'exif-out'), fps: 10, thinBelowNm: null, workers: 0, mapSettings: {}, processor: still, report: false });
    const times = (await readFile(join(dir, 'exif-out', 'series.csv'), 'utf8')).trim().split('\n').slice(1).map((l) => l.split(',')[1]);
    expect(times).toEqual(['0.000', '0.500', '1.750']);
    expect(result.summary!.settings.timeSource).toBe('exif');
    expect(result.warnings.some((w) => /frame rate \/ interval given is ignored/.test(w))).toBe(true);
  });
  it('a frame without EXIF among EXIF frames is named in a warning and timed by --fps', async () => {
    const folder = join(dir, 'mixed');
    await mkdir(folder);
    await jpeg(join(folder, 'p1.jpg'), { DateTimeOriginal: '2025:03:01 10:00:03' });
    await jpeg(join(folder, 'p2.jpg'), null);
    const result = await runSeries({ inputs: [folder], outDir: join(dir, 'mixed-out'), fps: 4, thinBelowNm: null, workers: 0, mapSettings: {}, processor: still, report: false });
    expect(result.warnings).toContain('frames without an EXIF capture time: p2.jpg; all frames timed from the frame rate instead of EXIF');
    const times = (await readFile(join(dir, 'mixed-out', 'series.csv'), 'utf8')).trim().split('\n').slice(1).map((l) => l.split(',')[1]);
    expect(times).toEqual(['0.000', '0.250']);
  });
});

describe('runSeries() with the real mapper (round trip on a rendered, thinning wedge)', () => {
  it('recovers each frame\'s mean thickness within 5 % and writes fits and a report', async () => {
    const folder = join(dir, 'wedge');
    const truths = await renderFrames(folder, 3);
    const processor = await createFrameProcessor(config);
    const result = await runSeries({
      inputs: [folder], outDir: join(dir, 'wedge-out'), fps: 1, thinBelowNm: 250, workers: 0,
      mapSettings: { stack: 'soap-film', light: 'D65' }, processor, generatedAt: '2025-01-01T00:00:00Z',
    });
    expect(result.failures).toEqual([]);
    const rows = (await readFile(join(dir, 'wedge-out', 'series.csv'), 'utf8')).trim().split('\n').slice(1).map((l) => l.split(','));
    expect(rows).toHaveLength(3);
    rows.forEach((cells, i) => {
      const trueMean = truths[i].reduce((s, v) => s + v, 0) / truths[i].length;
      expect(Math.abs(Number(cells[2]) - trueMean) / trueMean).toBeLessThan(0.05);
    });
    const reportHtml = await readFile(join(dir, 'wedge-out', 'report.html'), 'utf8');
    expect(reportHtml).toMatch(/^<!DOCTYPE html>/i);
    expect(reportHtml).toContain('Map view: Thickness map of shot3.jpg');
    // The map view shows the stored result of the last frame (no second mapping): its median is series.csv's.
    const viewMedian = /Median thickness<\/div><div class="value">([\d.]+) nm/.exec(reportHtml.slice(reportHtml.indexOf('Map view:')));
    expect(Number(viewMedian![1])).toBeCloseTo(Number(rows[2][3]), 1);
    expect(await readFile(join(dir, 'wedge-out', 'frames', 'shot3.confidence.npy'))).toBeTruthy();
    expect(result.summary!.drainageFits.length).toBeGreaterThan(0);
  });
});

describe('lamella series CLI on worker threads', () => {
  function lamella(...args: string[]) {
    const r = spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8' });
    return { status: r.status, stderr: r.stderr, stdout: r.stdout };
  }
  it('shards 1/2 and 2/2 then --aggregate-only give the single run\'s series.csv byte for byte; an unreadable frame gives exit 3', async () => {
    const folder = join(dir, 'cli');
    await renderFrames(folder, 4);
    await writeFile(join(folder, 'shot9.jpg'), 'not a photo');
    const common = ['--stack', 'soap-film', '--fps', '2', '--thin-below', '250', '--max-thickness', '1500', '--chunk-frames', '2', '--quiet', '--no-report'];
    const single = lamella('series', 'cli', ...common, '--workers', '2', '--out', 'single');
    expect(single.status).toBe(3);
    expect(single.stderr).toMatch(/shot9\.jpg/);
    expect(single.stderr.trim().split('\n')).toHaveLength(1);
    const one = lamella('series', 'cli/*.jpg', ...common, '--workers', '1', '--shard', '1/2', '--out', 'sharded');
    const two = lamella('series', 'cli/*.jpg', ...common, '--workers', '1', '--shard', '2/2', '--out', 'sharded');
    expect([one.status, two.status]).toEqual([3, 3]);
    const aggregate = lamella('series', 'cli', ...common, '--aggregate-only', '--out', 'sharded');
    expect(aggregate.status).toBe(3);
    expect(aggregate.stderr).toMatch(/shot9\.jpg/);
    const a = await readFile(join(dir, 'single', 'series.csv'), 'utf8');
    expect(await readFile(join(dir, 'sharded', 'series.csv'), 'utf8')).toBe(a);
    expect(a.trim().split('\n')).toHaveLength(5);
  });
});
