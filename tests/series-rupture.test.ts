/**
 * Rupture in `lamella series`: a film that is gone from a frame on. The series engine runs with a
 * test double in place of the thickness mapper (`workers: 0`, as in series-orchestration.test.ts):
 * each frame file says the thickness of a uniform film, or `none` for a frame whose map found no
 * film (`filmArea.found` false, "no film found", null statistics). All data are invented: a lab's
 * draining soap film in a wire frame, photographed at 2 frames/s, whose mean thickness follows
 * h(t) = 60 + 900·exp(−t/3) nm until it bursts. The rupture rule itself is the project's own
 * definition (issue 13, item 3), so the expected records below are worked out by hand from it.
 */
import { afterAll, afterEach, beforeEach, describe, expect, it } from 'vitest';
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { basename, join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { runSeries, type SeriesOptions } from '../src/series/runSeries.js';
import { findRupture, RUPTURE_RULE, describeRupture, type RuptureRecord } from '../src/series/rupture.js';
import { formatSeriesSummary } from '../src/series/summaryText.js';
import { fitDrainage } from '../src/series/fits/fitDrainage.js';
import { exponentialModel } from '../src/series/fits/drainageModels.js';
import type { SeriesRow } from '../src/series/seriesRows.js';
import type { FrameProcessor } from '../src/series/types.js';
import type { FilmAreaSummary, MapResult } from '../src/map/types.js';
import { PixelStatus } from '../src/map/types.js';
import type { FrameHeader } from '../src/series/probeFrames.js';
import { renderSeriesReport } from '../src/report/renderSeriesReport.js';
import { makeSeriesInput } from './report-fixtures.js';

const W = 4;
const H = 3;
const N = W * H;

/** The invented drainage law of the lab's film (nm, t in s). */
const draining = (tS: number) => 60 + 900 * Math.exp(-tS / 3);

function filmArea(found: boolean, areaPx: number): FilmAreaSummary {
  return {
    mode: 'auto', areaPx, fraction: areaPx / N, areaUm2: null, found,
    excludedPx: { outside_region: 0, dark_surroundings: N - areaPx, not_film_colour: 0, glint: 0, isolated: 0, undecided: 0 },
  };
}

/** A uniform film of `value` nm over the whole frame. */
function filmResult(value: number): MapResult {
  return {
    width: W, height: H,
    thicknessNm: new Float32Array(N).fill(value), confidence: new Float32Array(N).fill(1), status: new Uint8Array(N),
    fitted: { exposure: 6, whiteBalance: [1, 1, 1], flare: [0, 0, 0] },
    stats: {
      mean_nm: value, median_nm: value, std_nm: 0, min_nm: value, max_nm: value, p05_nm: value, p95_nm: value,
      uniformity: 0, coverage: 1, thin_fraction: value < 100 ? 1 : 0, thin_regions: value < 100 ? 1 : 0, film_area_px: N,
    },
    histogram: { edgesNm: [], counts: [] }, thinRegions: [], darkLimitNm: 20, warnings: [],
    filmArea: filmArea(true, N),
  };
}

/**
 * A frame whose map found no film. `outlier`: statistics a faulty map might still carry (a 5 nm
 * "film"), which must not reach the CSV or the fits.
 */
function noFilmResult(outlier = false): MapResult {
  const stats = outlier
    ? { mean_nm: 5, median_nm: 5, std_nm: 0, min_nm: 5, max_nm: 5, p05_nm: 5, p95_nm: 5, uniformity: 0, coverage: 1, thin_fraction: 1, thin_regions: 1, film_area_px: 3 }
    : { mean_nm: null, median_nm: null, std_nm: null, min_nm: null, max_nm: null, p05_nm: null, p95_nm: null, uniformity: null, coverage: 0, thin_fraction: null, thin_regions: 0, film_area_px: 0 };
  return {
    width: W, height: H,
    thicknessNm: new Float32Array(N).fill(NaN), confidence: new Float32Array(N), status: new Uint8Array(N).fill(PixelStatus.notFilm),
    fitted: { exposure: 6, whiteBalance: [1, 1, 1], flare: [0, 0, 0] },
    stats, histogram: { edgesNm: [], counts: [] }, thinRegions: [], darkLimitNm: 20, warnings: ['no film found'],
    filmArea: filmArea(false, outlier ? 3 : 0),
  };
}

/**
 * Test double: a frame file holds `<nm>` (film), `none` (no film found), `none!` (no film, with
 * outlier statistics) or `old <nm>` (a record from before film areas: no filmArea, no
 * film_area_px, 4 pixels outside the region).
 */
function double(calls: string[] = [], failOn?: string): FrameProcessor {
  return {
    async map(path) {
      const frame = basename(path);
      calls.push(frame);
      if (frame === failOn) throw new Error('cannot decode JPEG data');
      const text = (await readFile(path, 'utf8')).trim();
      if (text === 'none') return noFilmResult();
      if (text === 'none!') return noFilmResult(true);
      if (text.startsWith('old ')) {
        const result = filmResult(Number(text.slice(4)));
        const status = new Uint8Array(N);
        status.fill(PixelStatus.excluded, 0, 4);
        const { film_area_px: _dropped, ...stats } = result.stats;
        const { filmArea: _none, ...rest } = result;
        return { ...rest, status, stats: stats as MapResult['stats'] };
      }
      return filmResult(Number(text));
    },
  };
}

async function headerOf(path: string): Promise<FrameHeader> {
  const text = await readFile(path, 'utf8');
  if (text.startsWith('garbage')) throw new Error(`${path}: unsupported image format`);
  return { width: W, height: H, exifTimeMs: null };
}

let dir: string;
let inDir: string;
let outDir: string;

beforeEach(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-rupture-'));
  inDir = join(dir, 'in');
  outDir = join(dir, 'out');
  await mkdir(inDir);
});
afterEach(async () => {
  await rm(dir, { recursive: true, force: true });
});

/** Frames f1…fN at 2 fps: `film[i]` true → the draining film at t = i/2 s; false → `none`. */
async function makeFrames(film: boolean[], noFilmText = 'none'): Promise<void> {
  for (let i = 0; i < film.length; i++) {
    await writeFile(join(inDir, `f${i + 1}.jpg`), film[i] ? `${draining(i / 2)}` : noFilmText);
  }
}

function options(processor: FrameProcessor, extra: Partial<SeriesOptions> = {}): SeriesOptions {
  return {
    inputs: [inDir], outDir, fps: 2, thinBelowNm: 100, chunkFrames: 4, workers: 0,
    mapSettings: { stack: 'soap', light: 'D65' }, processor, readHeader: headerOf, report: false, ...extra,
  };
}

const csvRows = async () => (await readFile(join(outDir, 'series.csv'), 'utf8')).trim().split('\n').map((l) => l.split(','));
const seriesJson = async () => JSON.parse(await readFile(join(outDir, 'series.json'), 'utf8'));
/** Film in f1–f8 (0–3.5 s), none in f9–f12 (4–5.5 s). */
const bursting = [...Array(8).fill(true), ...Array(4).fill(false)] as boolean[];
const expectedBurst: RuptureRecord = {
  last_frame_with_film: 'f8.jpg', first_frame_without_film: 'f9.jpg', last_time_s: 3.5, first_time_s: 4,
  interval_s: 0.5, time_s: 3.75, rule: RUPTURE_RULE,
};

describe('series rupture: the record', () => {
  it('a film bursting after f8 gives the exact rupture record in series.json and in the result', async () => {
    await makeFrames(bursting);
    const result = await runSeries(options(double()));
    expect(result.summary!.rupture).toEqual(expectedBurst);
    expect((await seriesJson()).rupture).toEqual(expectedBurst);
    expect(result.warnings.filter((w) => /reappears/.test(w))).toEqual([]);
  });

  it('series.csv has film_area_px after coverage: 12 px with film; 0, empty statistics and exposure without', async () => {
    await makeFrames(bursting);
    await runSeries(options(double()));
    const rows = await csvRows();
    expect(rows[0]).toEqual(['frame', 'time_s', 'mean_nm', 'median_nm', 'min_nm', 'max_nm', 'std_nm', 'thin_fraction', 'thin_regions', 'coverage', 'film_area_px', 'exposure']);
    expect(rows).toHaveLength(13); // every frame keeps its row
    expect(rows[8]).toEqual(['f8.jpg', '3.500', draining(3.5).toFixed(2), draining(3.5).toFixed(2), draining(3.5).toFixed(2), draining(3.5).toFixed(2), '0.00', '0.0000', '0', '1.0000', '12', '6.0000']);
    expect(rows[9]).toEqual(['f9.jpg', '4.000', '', '', '', '', '', '', '0', '', '0', '']);
  });

  it('no rupture when the film lasts to the last frame: rupture null', async () => {
    await makeFrames(Array(6).fill(true));
    const result = await runSeries(options(double()));
    expect(result.summary!.rupture).toBeNull();
    expect((await seriesJson()).rupture).toBeNull();
    expect(formatSeriesSummary(result).join('\n')).not.toMatch(/ruptured/);
  });

  it('a frame that failed is evidence neither way: the rupture spans it; a failed last frame is no rupture', async () => {
    // f1–f6 film, f7 fails to map, f8–f10 no film.
    await makeFrames([true, true, true, true, true, true, true, false, false, false]);
    const result = await runSeries(options(double([], 'f7.jpg')));
    expect(result.failures).toEqual(['f7.jpg: cannot decode JPEG data']);
    expect(result.summary!.rupture).toEqual({
      last_frame_with_film: 'f6.jpg', first_frame_without_film: 'f8.jpg', last_time_s: 2.5, first_time_s: 3.5,
      interval_s: 1, time_s: 3, rule: RUPTURE_RULE,
    });
    await rm(outDir, { recursive: true });
    await rm(inDir, { recursive: true });
    await mkdir(inDir);
    await makeFrames(Array(6).fill(true));
    await writeFile(join(inDir, 'f7.jpg'), 'garbage'); // unreadable: rejected before mapping
    const second = await runSeries(options(double()));
    expect(second.failures).toHaveLength(1);
    expect(second.summary!.rupture).toBeNull();
  });

  it('film reappearing after frames without film gives a warning naming them, and the rupture where it is gone for good', async () => {
    // f1–f5 film, f6–f7 none, f8–f9 film (a new film, or a misdetection), f10–f12 none.
    await makeFrames([true, true, true, true, true, false, false, true, true, false, false, false]);
    const result = await runSeries(options(double()));
    const reappear = result.warnings.filter((w) => /reappears/.test(w));
    expect(reappear).toEqual([
      'film reappears after frames f6.jpg … f7.jpg (2 frames) without film: no film after f5.jpg, film again in f8.jpg '
      + '(a new film, or a film the detection missed); the rupture is taken where the film is gone for good',
    ]);
    expect((await seriesJson()).warnings).toContain(reappear[0]);
    expect(result.summary!.rupture).toEqual({
      last_frame_with_film: 'f9.jpg', first_frame_without_film: 'f10.jpg', last_time_s: 4, first_time_s: 4.5,
      interval_s: 0.5, time_s: 4.25, rule: RUPTURE_RULE,
    });
    // The fits use the 7 frames with film up to f9 (f6, f7 have no statistics).
    for (const fit of result.summary!.drainageFits) expect(fit.points).toBe(7);
  });

  it('findRupture(): a single frame gap is named as one frame; no film anywhere is a warning and no rupture', () => {
    const row = (frame: string, timeS: number, filmFound: boolean): SeriesRow => ({
      frame, timeS, meanNm: filmFound ? 500 : null, medianNm: null, minNm: null, maxNm: null, stdNm: null,
      thinFraction: null, thinRegions: 0, coverage: filmFound ? 1 : null, exposure: null, darkLimitNm: null, filmFound, filmAreaPx: filmFound ? 10 : 0,
    });
    const gap = findRupture([row('a', 0, true), row('b', 1, false), row('c', 2, true), row('d', 3, true)]);
    expect(gap.rupture).toBeNull();
    expect(gap.lastFilmIndex).toBe(3);
    expect(gap.warnings).toEqual(['film reappears after frame b without film: no film after a, film again in c '
      + '(a new film, or a film the detection missed); the rupture is taken where the film is gone for good']);
    // Frames without film before any film are no gap and no rupture; film then none is a rupture.
    const late = findRupture([row('a', 0, false), row('b', 1, true), row('c', 2, false)]);
    expect(late.warnings).toEqual([]);
    expect(late.rupture?.last_frame_with_film).toBe('b');
    const none = findRupture([row('a', 0, false), row('b', 1, false)]);
    expect(none.rupture).toBeNull();
    expect(none.lastFilmIndex).toBe(-1);
    expect(none.warnings).toEqual(['no film found in any of the 2 frame(s) with results: no drainage curve and no rupture']);
    // Rows of records from before film areas (no filmFound) count as film.
    const { filmFound: _f, ...oldRow } = row('z', 0, true);
    expect(findRupture([oldRow as SeriesRow]).lastFilmIndex).toBe(0);
  });
});

describe('series rupture: fits and crossings stop at the rupture', () => {
  it('the fits use only the 8 frames before the rupture, exactly as a fit of those frames alone', async () => {
    await makeFrames(bursting);
    const result = await runSeries(options(double()));
    const fits = result.summary!.drainageFits;
    expect(fits.length).toBeGreaterThan(0);
    for (const fit of fits) expect(fit.points).toBe(8);
    const tS = Array.from({ length: 8 }, (_, i) => i / 2);
    const alone = fitDrainage(tS, tS.map(draining), exponentialModel, { quantity: 'mean', thinBelowNm: 100, ruptureS: 4 });
    const inSeries = fits.find((f) => f.model === 'exponential' && f.quantity === 'mean')!;
    expect(inSeries.parameters).toEqual(alone.parameters);
  });

  it('a post-rupture frame carrying outlier statistics changes neither the CSV nor the fits', async () => {
    await makeFrames(bursting);
    await runSeries(options(double()));
    const cleanCsv = await readFile(join(outDir, 'series.csv'), 'utf8');
    const cleanFits = (await seriesJson()).drainage_fits;
    await rm(outDir, { recursive: true });
    await rm(inDir, { recursive: true });
    await mkdir(inDir);
    await makeFrames(bursting, 'none!');
    await runSeries(options(double()));
    expect(await readFile(join(outDir, 'series.csv'), 'utf8')).toBe(cleanCsv);
    expect((await seriesJson()).drainage_fits).toEqual(cleanFits);
  });

  it('a crossing the curve would make after the rupture is not predicted, and the summary says so', async () => {
    // The film's law reaches 100 nm at 3·ln(900/40) = 9.34 s, long after the burst at 3.5–4 s.
    await makeFrames(bursting);
    const result = await runSeries(options(double()));
    const exp = result.summary!.drainageFits.find((f) => f.model === 'exponential' && f.quantity === 'mean')!;
    expect(exp.crossing).toMatchObject({ timeS: null, lowS: null, highS: null, beyondRupture: true, extrapolated: false });
    for (const fit of result.summary!.drainageFits) {
      const c = fit.crossing!;
      expect(c.beyondRupture || c.timeS === null || c.timeS <= 4).toBe(true);
    }
    const lines = formatSeriesSummary(result);
    expect(lines).toContain('series: Film ruptured between 3.5 s (frame f8.jpg) and 4 s (frame f9.jpg); drainage fits use the frames up to f8.jpg');
    expect(lines.find((l) => /mean thickness, exponential/.test(l))).toMatch(/the film ruptured \(by 4 s\) before the curve reaches 100 nm: no crossing predicted$/);
  });

  it('fitDrainage(): a crossing before the rupture is still predicted; without a rupture nothing changes', () => {
    const tS = Array.from({ length: 8 }, (_, i) => i / 2);
    const early = fitDrainage(tS, tS.map(draining), exponentialModel, { quantity: 'mean', thinBelowNm: 400, ruptureS: 4 });
    // 60 + 900·exp(−t/3) = 400 at t = 3·ln(900/340) = 2.92 s (closed form), before the rupture.
    expect(early.crossing!.beyondRupture).toBe(false);
    expect(early.crossing!.timeS!).toBeCloseTo(3 * Math.log(900 / 340), 4);
    const free = fitDrainage(tS, tS.map(draining), exponentialModel, { quantity: 'mean', thinBelowNm: 100 });
    expect(free.crossing!.beyondRupture).toBe(false);
    expect(free.crossing!.timeS!).toBeCloseTo(3 * Math.log(900 / 40), 3);
    expect(free.crossing!.extrapolated).toBe(true);
  });
});

describe('series rupture: shards, old records', () => {
  it('three shards plus --aggregate-only give the single run\'s series.csv and series.json byte for byte', async () => {
    await makeFrames([true, true, true, true, true, false, false, true, true, false, false, false]);
    await runSeries(options(double()));
    const singleCsv = await readFile(join(outDir, 'series.csv'), 'utf8');
    const singleJson = await readFile(join(outDir, 'series.json'), 'utf8');
    await rm(outDir, { recursive: true });
    for (let k = 1; k <= 3; k++) await runSeries(options(double(), { shard: { index: k, count: 3 } }));
    const calls: string[] = [];
    const aggregated = await runSeries(options(double(calls), { aggregateOnly: true }));
    expect(calls).toEqual([]);
    expect(aggregated.summary!.rupture!.first_frame_without_film).toBe('f10.jpg');
    expect(await readFile(join(outDir, 'series.csv'), 'utf8')).toBe(singleCsv);
    expect(await readFile(join(outDir, 'series.json'), 'utf8')).toBe(singleJson);
  });

  it('frame records from before film areas count as film, their area the pixels not excluded', async () => {
    await writeFile(join(inDir, 'f1.jpg'), 'old 900');
    await writeFile(join(inDir, 'f2.jpg'), 'old 800');
    const result = await runSeries(options(double()));
    const record = JSON.parse(await readFile(join(outDir, 'frames', 'f1.json'), 'utf8'));
    expect(record.schema_version).toBe(1);
    expect(record.film_area).toBeUndefined();
    expect(record.stats.film_area_px).toBeUndefined();
    const rows = await csvRows();
    expect(rows.slice(1).map((r) => [r[0], r[2], r[10]])).toEqual([['f1.jpg', '900.00', '8'], ['f2.jpg', '800.00', '8']]);
    expect(result.summary!.rupture).toBeNull();
  });
});

describe('series rupture: the report', () => {
  const chromiumPath = '/usr/bin/chromium';
  const shots = join(process.env.LAMELLA_REPORT_SHOTS ?? tmpdir(), `lamella-rupture-${process.pid}`);
  afterAll(async () => {
    if (!process.env.LAMELLA_REPORT_SHOTS) await rm(shots, { recursive: true, force: true });
  });

  it('report.html opens with the rupture line and marks the rupture on both charts', async () => {
    await makeFrames(bursting);
    await runSeries(options(double(), { report: true, generatedAt: '2026-12-02T10:00:00Z' }));
    const html = await readFile(join(outDir, 'report.html'), 'utf8');
    expect(html).toContain('Film ruptured between 3.5 s (frame f8.jpg) and 4 s (frame f9.jpg)');
    // The marker: a labelled solid line in each chart (drainage and thin fraction), over a band.
    const tags = html.match(/<text class="ref-label"[^>]*>film ruptured \(3\.5–4 s\)<\/text>/g) ?? [];
    expect(tags).toHaveLength(2);
    expect(html.match(/<title>rupture: between 3\.5–4 s<\/title>/g) ?? []).toHaveLength(2);
    expect(html).toContain('the film ruptured first (none predicted past the rupture)');
    expect(html).toContain('no film</td>');
    // No rupture: no marker and no headline.
    const plain = renderSeriesReport(await makeSeriesInput(5, false));
    expect(plain).not.toMatch(/ruptured/);
  });

  it('describeRupture() and the report headline say the same', () => {
    expect(describeRupture(expectedBurst)).toBe('Film ruptured between 3.5 s (frame f8.jpg) and 4 s (frame f9.jpg)');
  });

  it.skipIf(!existsSync(chromiumPath))('the report renders in headless Chromium with the marker visible (screenshot kept with LAMELLA_REPORT_SHOTS)', async () => {
    const { chromium } = await import('playwright-core');
    await makeFrames([...Array(14).fill(true), ...Array(4).fill(false)]);
    await runSeries(options(double(), { report: true, generatedAt: '2026-12-02T10:00:00Z' }));
    await mkdir(shots, { recursive: true });
    const browser = await chromium.launch({ executablePath: chromiumPath, args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run'] });
    try {
      const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(String(e)));
      page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()); });
      await page.goto(pathToFileURL(join(outDir, 'report.html')).href, { waitUntil: 'load' });
      expect(errors).toEqual([]);
      expect(await page.locator('#rupture h2').textContent()).toBe('Film ruptured between 6.5 s (frame f14.jpg) and 7 s (frame f15.jpg)');
      // The marker line lies between the x positions of the last film frame and the first without.
      const line = page.locator('#drainage-chart line.ref-line[stroke="#8e1b10"]');
      expect(await line.count()).toBe(1);
      const box = await line.boundingBox();
      expect(box!.height).toBeGreaterThan(100);
      const lineX = Number(await line.getAttribute('x1'));
      const meanXs = await page.locator('#drainage-chart g.series[data-label="mean"] circle')
        .evaluateAll((cs) => cs.map((c) => Number(c.getAttribute('cx'))));
      expect(meanXs).toHaveLength(14); // frames with film only
      const stepPx = meanXs[13] - meanXs[12];
      expect(lineX - meanXs[13]).toBeCloseTo(stepPx / 2, 0); // halfway to the first frame without film
      // The slider on a frame without film reads "no film".
      await page.locator('#frame-slider').fill('17');
      expect(await page.locator('#frame-film').textContent()).toBe('no film');
      await page.locator('#drainage').scrollIntoViewIfNeeded();
      await page.screenshot({ path: join(shots, 'series-rupture.png'), fullPage: true });
    } finally {
      await browser.close();
    }
  }, 60_000);
});
