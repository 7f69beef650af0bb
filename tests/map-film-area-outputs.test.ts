/**
 * The film area in the outputs, on hand-made map results (no photo is mapped here): the JSON
 * `film_area`, `fit_quality` and `pixel_counts` blocks, the map PNG's "not film" and "undecided"
 * hatches with their legend entries, the film area's outline on the flags image and on the
 * report's photo, the colour-bar range over film pixels only, the report's "No film found", the
 * CLI summary line, and `--film-area` / `--expect` reaching MapOptions and the series' settings
 * hash. Invented scenario of our own: a 40 × 30 px crop of a film in a frame before a dark cloth
 * (left 10 columns not film, a 6 × 6 px dark corner undecided), thicknesses made up.
 * Expected values are the definitions in src/map/types.ts and README (contract), not measurements.
 */
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { filmAreaFromOptions, parseExpect, parseFilmAreaMode } from '../src/cli/filmAreaOptions.js';
import { summaryLine } from '../src/cli/commands/map.js';
import { seriesOptionsFrom, type SeriesCliOptions } from '../src/cli/commands/series.js';
import { seriesJobOptions } from '../src/api/runSeries.js';
import { UsageError } from '../src/cli/errors.js';
import {
  FILM_OUTLINE_DASH, THIN_OUTLINE, filmEdge, mapPngLayout, renderFlagsPng, renderMapPng, scaleRangeOf,
} from '../src/map/mapImages.js';
import type { MappedPhoto } from '../src/map/mapPhoto.js';
import { mapReportInput } from '../src/map/mapReportInput.js';
import { mapResultJson } from '../src/map/mapResultJson.js';
import { type FilmAreaSummary, type MapOptions, type MapResult, PixelStatus } from '../src/map/types.js';
import { resolveStack } from '../src/optics/index.js';
import { renderMapReport } from '../src/report/index.js';
import { mapOptionsFromConfig } from '../src/series/mapFrameProcessor.js';
import { settingsHash } from '../src/series/settingsHash.js';
import { floatPixels } from '../src/map/photoPixels.js';

const W = 40;
const H = 30;
const NOT_FILM_COLUMNS = 10;
const isUndecided = (x: number, y: number): boolean => x >= W - 6 && y >= H - 6;

/** The invented crop: not film left, undecided corner bottom right, film (ok, 200 + 10·x nm) elsewhere. */
function handMadeResult(extra: Partial<MapResult> = {}): MappedPhoto {
  const n = W * H;
  const status = new Uint8Array(n);
  const thicknessNm = new Float32Array(n);
  const confidence = new Float32Array(n);
  const photoRgb = new Float32Array(n * 3);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const i = y * W + x;
      photoRgb.set([0.5, 0.3, 0.2], i * 3);
      if (x < NOT_FILM_COLUMNS) {
        status[i] = PixelStatus.notFilm;
        // A thickness a not-film pixel should never carry; the colour bar must not see it.
        thicknessNm[i] = 5000;
      } else if (isUndecided(x, y)) {
        status[i] = PixelStatus.undecided;
        thicknessNm[i] = NaN;
      } else {
        status[i] = PixelStatus.ok;
        thicknessNm[i] = 200 + 10 * x;
        confidence[i] = 0.9;
      }
    }
  }
  const filmPx = n - NOT_FILM_COLUMNS * H - 36;
  return {
    width: W,
    height: H,
    thicknessNm,
    confidence,
    status,
    photoPixels: floatPixels(photoRgb),
    fitted: { exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] },
    stats: {
      mean_nm: 400, median_nm: 400, std_nm: 80, min_nm: 300, max_nm: 590, p05_nm: 310, p95_nm: 580,
      uniformity: 0.67, coverage: 1, thin_fraction: 0, thin_regions: 0, film_area_px: filmPx,
    },
    histogram: { edgesNm: [300, 400, 500, 600], counts: [10, 10, 10] },
    thinRegions: [],
    darkLimitNm: 30,
    warnings: [],
    ...extra,
  };
}

const stack = resolveStack('soap-film');
const options: MapOptions = { stack, angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000, pixelSizeUm: 5, filmArea: 'auto', expectNm: [250, 700] };

async function decode(png: Buffer): Promise<{ data: Buffer; width: number; height: number }> {
  const { data, info } = await sharp(png).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height };
}

const pixel = (img: { data: Buffer; width: number }, x: number, y: number): [number, number, number] => {
  const k = (Math.round(y) * img.width + Math.round(x)) * 3;
  return [img.data[k], img.data[k + 1], img.data[k + 2]];
};

describe('JSON record: film_area, fit_quality, pixel_counts, settings', () => {
  it('counts not-film and undecided pixels under their own names, never as saturated', () => {
    const record = mapResultJson(handMadeResult(), options, 'frame.png');
    const counts = record.pixel_counts as Record<string, number>;
    expect(counts.not_film).toBe(NOT_FILM_COLUMNS * H);
    expect(counts.undecided).toBe(36);
    expect(counts.saturated).toBe(0);
    expect(counts.ok).toBe(W * H - NOT_FILM_COLUMNS * H - 36);
    expect(counts.unknown).toBeUndefined();
  });

  it('derives film_area from the statuses when the result carries none (older results)', () => {
    const record = mapResultJson(handMadeResult(), options, 'frame.png');
    const area = record.film_area as Record<string, unknown>;
    const filmPx = W * H - NOT_FILM_COLUMNS * H - 36;
    expect(area.area_px).toBe(filmPx);
    expect(area.fraction).toBeCloseTo(filmPx / (W * H), 12);
    // 5 µm pixels: 25 µm² each.
    expect(area.area_um2).toBe(filmPx * 25);
    expect(area.area_mm2).toBeCloseTo((filmPx * 25) / 1e6, 15);
    expect(area.found).toBe(true);
    expect(area.mode).toBe('auto');
    expect(area.excluded_px).toEqual({ outside_region: 0, dark_surroundings: 0, not_film_colour: NOT_FILM_COLUMNS * H, glint: 0, isolated: 0, undecided: 36 });
    expect(record.fit_quality).toBeNull();
  });

  it('copies the mapper\'s film area and fit quality, with mm² from µm²', () => {
    const filmArea: FilmAreaSummary = {
      mode: 'auto', areaPx: 864, fraction: 0.72, areaUm2: 21600, found: true,
      excludedPx: { outside_region: 0, dark_surroundings: 200, not_film_colour: 90, glint: 6, isolated: 4, undecided: 36 },
    };
    const fitQuality = { median_delta_e2000: 1.2, p95_delta_e2000: 3.4, unmatched_fraction: 0.01, verdict: 'good' as const };
    const record = mapResultJson(handMadeResult({ filmArea, fitQuality }), options, 'frame.png');
    expect(record.film_area).toEqual({
      mode: 'auto', area_px: 864, fraction: 0.72, area_um2: 21600, area_mm2: 0.0216, found: true,
      excluded_px: { outside_region: 0, dark_surroundings: 200, not_film_colour: 90, glint: 6, isolated: 4, undecided: 36 },
    });
    expect(record.fit_quality).toEqual(fitQuality);
    const settings = record.settings as Record<string, unknown>;
    expect(settings.film_area).toBe('auto');
    expect(settings.expect_nm).toEqual([250, 700]);
  });

  it('settings.expect_nm is null without --expect, and film_area mode whole when nothing was left out', () => {
    const n = W * H;
    const plain = handMadeResult({ status: new Uint8Array(n) });
    const record = mapResultJson(plain, { ...options, filmArea: 'whole', expectNm: null, pixelSizeUm: null }, 'frame.png');
    expect((record.settings as Record<string, unknown>).expect_nm).toBeNull();
    expect((record.settings as Record<string, unknown>).film_area).toBe('whole');
    const area = record.film_area as Record<string, unknown>;
    expect(area).toMatchObject({ mode: 'whole', area_px: n, fraction: 1, area_um2: null, area_mm2: null, found: true });
  });
});

describe('map PNG: not film, undecided, legend, colour bar', () => {
  it('takes the colour-bar range from film pixels only (not-film pixels holding 5000 nm are ignored)', () => {
    const range = scaleRangeOf(handMadeResult());
    // Film holds 300 … 550 nm (x = 10 … 35 outside the corner; 200 + 10·39 = 590 nm in rows above it).
    expect(range.minNm).toBeLessThanOrEqual(300);
    expect(range.minNm).toBeGreaterThanOrEqual(200);
    expect(range.maxNm).toBeGreaterThanOrEqual(590);
    expect(range.maxNm).toBeLessThan(1000);
  });

  it('draws not film as a pale "/" hatch and undecided as a dark "\\" hatch over light grey, each with a legend swatch', async () => {
    const result = handMadeResult();
    const png = await renderMapPng(result, scaleRangeOf(result), null, 'frame.png — thickness');
    const img = await decode(png);
    const layout = mapPngLayout(W, H, { notFilm: true, undecided: true });
    expect([img.width, img.height]).toEqual([layout.canvasWidth, layout.canvasHeight]);
    const at = (x: number, y: number) => pixel(img, layout.margin + x, layout.top + y);
    // Not film: only the two neutral greys, both present, constant along "/" (x + y constant).
    const notFilmValues = new Set<number>();
    for (let y = 1; y < H; y++) {
      for (let x = 0; x < NOT_FILM_COLUMNS - 1; x++) {
        const [r, g, b] = at(x, y);
        expect(r === g && g === b).toBe(true);
        notFilmValues.add(r);
        expect(at(x + 1, y - 1)[0]).toBe(r);
      }
    }
    expect([...notFilmValues].sort()).toEqual([212, 244]);
    // Undecided: the grey and a dark line, constant along "\" (x − y constant).
    const undecidedValues = new Set<number>();
    for (let y = H - 6; y < H - 1; y++) {
      for (let x = W - 6; x < W - 1; x++) {
        undecidedValues.add(at(x, y)[0]);
        expect(at(x + 1, y + 1)[0]).toBe(at(x, y)[0]);
      }
    }
    expect([...undecidedValues].sort()).toEqual([212, 96]);
    // Legend: four swatches; the last two hatched in their own greys (antialiased edges allowed).
    expect(layout.swatches.map((s) => s.key)).toEqual(['dark', 'noEstimate', 'notFilm', 'undecided']);
    const inside = (key: string) => {
      const s = layout.swatches.find((w) => w.key === key)!;
      const values: number[] = [];
      for (let y = Math.ceil(s.top + s.size * 0.2); y < s.top + s.size * 0.8; y++) {
        for (let x = Math.ceil(s.left + s.size * 0.2); x < s.left + s.size * 0.8; x++) {
          const [r, g, b] = pixel(img, x, y);
          expect(Math.max(r, g, b) - Math.min(r, g, b)).toBeLessThanOrEqual(2);
          values.push(r);
        }
      }
      return values;
    };
    const pale = inside('notFilm');
    expect(Math.min(...pale)).toBeGreaterThanOrEqual(205);
    expect(Math.max(...pale) - Math.min(...pale)).toBeGreaterThan(10);
    const dark = inside('undecided');
    expect(Math.min(...dark)).toBeLessThan(170);
    expect(Math.max(...dark)).toBeGreaterThanOrEqual(200);
    expect(inside('dark').every((v) => v <= 2)).toBe(true);
    expect(inside('noEstimate').every((v) => Math.abs(v - 128) <= 2)).toBe(true);
  });

  it('shows no legend entry for a status the map does not hold', async () => {
    const result = handMadeResult({ status: new Uint8Array(W * H) });
    const img = await decode(await renderMapPng(result, scaleRangeOf(result), null, 't'));
    const layout = mapPngLayout(W, H, { notFilm: false, undecided: false });
    expect(layout.swatches).toHaveLength(2);
    expect(img.height).toBe(layout.canvasHeight);
    // Where a third swatch would sit, the panel stays white.
    const third = mapPngLayout(W, H, { notFilm: true, undecided: false }).swatches[2];
    if (third.top + third.size < img.height) {
      const [r, g, b] = pixel(img, third.left + third.size / 2, third.top + third.size / 2);
      expect([r, g, b]).toEqual([255, 255, 255]);
    }
  });
});

describe('flags PNG: the film area outlined', () => {
  it('outlines the film along its edge in cyan and black dashes, leaves the rest of the photo as it was, and keeps thin outlines', async () => {
    const result = handMadeResult();
    const labels = new Int32Array(W * H);
    // A thin region (invented) inside the film: 6 × 6 px at x 18..23, y 10..15.
    for (let y = 10; y < 16; y++) for (let x = 18; x < 24; x++) labels[y * W + x] = 1;
    const img = await decode(await renderFlagsPng(result.photoPixels!, W, H, labels, result.status));
    const photo: [number, number, number] = [128, 77, 51];
    const edge = filmEdge(result.status, W, H);
    const dashes = new Set<string>();
    for (let y = 0; y < H; y++) {
      // The film pixel next to the not-film columns is outline; the not-film pixel is the photo.
      expect(edge[y * W + NOT_FILM_COLUMNS]).toBe(1);
      const p = pixel(img, NOT_FILM_COLUMNS, y);
      expect(FILM_OUTLINE_DASH.map((c) => c.join())).toContain(p.join());
      dashes.add(p.join());
      expect(pixel(img, NOT_FILM_COLUMNS - 1, y)).toEqual(photo);
    }
    expect(dashes.size).toBe(2);
    // The undecided corner's border is outlined from the film side.
    expect(FILM_OUTLINE_DASH.map((c) => c.join())).toContain(pixel(img, W - 7, H - 3).join());
    expect(pixel(img, W - 3, H - 3)).toEqual(photo);
    // Film inside, away from both outlines: untouched.
    expect(pixel(img, 14, 25)).toEqual(photo);
    // The thin region's outline is still orange-red.
    expect(pixel(img, 18, 12)).toEqual([...THIN_OUTLINE]);
  });

  it('draws no film outline when the whole photo is film', async () => {
    const result = handMadeResult({ status: new Uint8Array(W * H) });
    const img = await decode(await renderFlagsPng(result.photoPixels!, W, H, new Int32Array(W * H), result.status));
    for (let i = 0; i < W * H; i++) expect(pixel(img, i % W, Math.floor(i / W))).toEqual([128, 77, 51]);
  });
});

describe('report: film area, fit quality, no film found', () => {
  it('outlines the film area on the report photo, embeds the statuses, and shows the area and fit in words', async () => {
    const filmArea: FilmAreaSummary = {
      mode: 'auto', areaPx: W * H - NOT_FILM_COLUMNS * H - 36, fraction: (W * H - NOT_FILM_COLUMNS * H - 36) / (W * H),
      areaUm2: (W * H - NOT_FILM_COLUMNS * H - 36) * 25, found: true,
      excludedPx: { outside_region: 0, dark_surroundings: NOT_FILM_COLUMNS * H, not_film_colour: 0, glint: 0, isolated: 0, undecided: 36 },
    };
    const result = handMadeResult({ filmArea, fitQuality: { median_delta_e2000: 4.5, p95_delta_e2000: 12, unmatched_fraction: 0.2, verdict: 'poor' } });
    const input = await mapReportInput(result, options, 'frame.png');
    expect(input.grid.status).toBeDefined();
    expect(input.grid.status![0]).toBe(PixelStatus.notFilm);
    const photo = await decode(input.photoPng);
    expect(FILM_OUTLINE_DASH.map((c) => c.join())).toContain(pixel(photo, NOT_FILM_COLUMNS, 5).join());
    expect(pixel(photo, 3, 5)).toEqual([128, 77, 51]);
    const html = renderMapReport(input);
    expect(html).toContain('id="film-area"');
    expect(html).toContain('film area outlined (dashed cyan and black line)');
    expect(html).toContain(`${filmArea.areaPx} px (${(filmArea.fraction * 100).toFixed(1)} % of the photo)`);
    // 864 px × 25 µm² = 21 600 µm² = 0.0216 mm².
    expect(html).toContain('0.0216 mm²');
    expect(html).toContain('Dark surroundings');
    expect(html).toContain('Undecided: black film or background');
    expect(html).not.toContain('Glints');
    expect(html).toContain('Poor: the model does not explain the film’s colours');
    expect(html).toContain('class="values stats"');
    expect(html).not.toContain('No film found in this photo');
  });

  it('says "No film found in this photo" instead of statistics when the film area is empty', async () => {
    const n = W * H;
    const status = new Uint8Array(n).fill(PixelStatus.notFilm);
    const filmArea: FilmAreaSummary = {
      mode: 'auto', areaPx: 0, fraction: 0, areaUm2: 0, found: false,
      excludedPx: { outside_region: 0, dark_surroundings: 0, not_film_colour: n, glint: 0, isolated: 0, undecided: 0 },
    };
    const result = handMadeResult({
      status,
      thicknessNm: new Float32Array(n).fill(NaN),
      filmArea,
      fitQuality: null,
      warnings: ['no film found'],
      stats: {
        mean_nm: null, median_nm: null, std_nm: null, min_nm: null, max_nm: null, p05_nm: null, p95_nm: null,
        uniformity: null, coverage: 0, thin_fraction: null, thin_regions: 0, film_area_px: 0,
      },
    });
    const html = renderMapReport(await mapReportInput(result, options, 'cloth.png'));
    expect(html).toContain('No film found in this photo');
    expect(html).not.toContain('class="values stats"');
    expect(html).not.toContain('Median thickness');
    expect(html).toContain('Not measured for this map.');
  });

  it('refuses a film area with an unknown mode, naming the field', async () => {
    const input = await mapReportInput(handMadeResult(), options, 'frame.png');
    expect(() => renderMapReport({ ...input, filmArea: { ...input.filmArea!, mode: 'most' as 'auto' } })).toThrow(/input\.filmArea\.mode/);
  });
});

describe('CLI: summary line, --film-area and --expect', () => {
  it('the summary line says when no film was found, and gives the film share otherwise', () => {
    const none = handMadeResult({ filmArea: { mode: 'auto', areaPx: 0, fraction: 0, areaUm2: null, found: false, excludedPx: { outside_region: 0, dark_surroundings: 0, not_film_colour: W * H, glint: 0, isolated: 0, undecided: 0 } } });
    expect(summaryLine('cloth.jpg', none)).toBe('cloth.jpg: no film found in this photo (no statistics, no thin regions)');
    const some = handMadeResult({ filmArea: { mode: 'auto', areaPx: 600, fraction: 0.5, areaUm2: null, found: true, excludedPx: { outside_region: 0, dark_surroundings: 600, not_film_colour: 0, glint: 0, isolated: 0, undecided: 0 } } });
    expect(summaryLine('frame.jpg', some)).toMatch(/^frame\.jpg: median 400\.0 nm .*, film 50\.0 % of the photo, coverage 100\.0 %/);
  });

  it('parses --film-area and --expect, defaults auto and none', () => {
    expect(filmAreaFromOptions({ maxThickness: '2000' })).toMatchObject({ filmArea: 'auto', expectNm: null });
    expect(filmAreaFromOptions({ maxThickness: '2000', filmArea: 'whole', expect: '80-140' })).toMatchObject({ filmArea: 'whole', expectNm: [80, 140] });
    expect(parseExpect('92.5 - 110.25', 2000)).toEqual([92.5, 110.25]);
    expect(parseExpect('0-50nm', 2000)).toEqual([0, 50]);
    expect(parseFilmAreaMode('whole')).toBe('whole');
  });

  it.each([
    ['--film-area', () => parseFilmAreaMode('mask')],
    ['--expect', () => parseExpect('140-80', 2000)],
    ['--expect', () => parseExpect('100-100', 2000)],
    ['--expect', () => parseExpect('-10-50', 2000)],
    ['--expect', () => parseExpect('1e2-2e2', 2000)],
    ['--expect', () => parseExpect('80', 2000)],
    ['--expect', () => parseExpect('100-2500', 2000)],
  ])('refuses a bad %s as a usage error naming it', (option, call) => {
    expect(call).toThrow(UsageError);
    expect(call).toThrow(option);
  });

  it('series: --film-area and --expect reach each frame\'s MapOptions and change the settings hash', async () => {
    const base: SeriesCliOptions = { stack: 'soap-film', light: 'D65', workers: '1', chunkFrames: '10', maxThickness: '2000', report: false, out: 'unused' };
    const auto = await seriesJobOptions(['a.png'], await seriesOptionsFrom(base));
    const whole = await seriesJobOptions(['a.png'], await seriesOptionsFrom({ ...base, filmArea: 'whole' }));
    const expected = await seriesJobOptions(['a.png'], await seriesOptionsFrom({ ...base, expect: '300-600' }));
    const configOf = (o: typeof auto) => (o.processor as { config: Parameters<typeof mapOptionsFromConfig>[0] }).config;
    expect(mapOptionsFromConfig(configOf(auto))).toMatchObject({ filmArea: 'auto', expectNm: null });
    expect(mapOptionsFromConfig(configOf(whole))).toMatchObject({ filmArea: 'whole' });
    expect(mapOptionsFromConfig(configOf(expected))).toMatchObject({ filmArea: 'auto', expectNm: [300, 600] });
    // runSeries hashes `mapSettings` (src/series/runSeries.ts): all three must differ.
    const hashes = new Set([auto, whole, expected].map((o) => settingsHash(o.mapSettings)));
    expect(hashes.size).toBe(3);
    await expect(seriesOptionsFrom({ ...base, filmArea: 'half' })).rejects.toThrow(/--film-area/);
  });
});
