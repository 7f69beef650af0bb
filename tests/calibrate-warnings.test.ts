/**
 * Calibrations the data cannot support must say so. Photos are rendered with our own forward
 * model from the INVENTED step wafer (tests/calibrate-scenes.ts); the checks are on warnings and
 * on what the record claims was fitted, not on numbers from outside. The measurement of the known
 * rectangles (median colour, its standard error, clipped share) is checked against plain
 * statistics of the normal distribution: interquartile range 1.349 σ and standard error of the
 * median 1.2533 σ/√n (common practice; e.g. Kendall & Stuart, from memory).
 */
import { describe, expect, it } from 'vitest';
import { calibrateDecoded } from '../src/calibrate/calibrate.js';
import type { CalibrationParameter } from '../src/calibrate/fitCalibration.js';
import { knownRegionColours, type KnownRegion } from '../src/calibrate/knownRegions.js';
import { UsageError } from '../src/cli/errors.js';
import { resolveStack } from '../src/optics/index.js';
import { asDecoded, HEIGHT, patchRect, shoot, stepKnownRegions, stepWafer, WIDTH, type Shot } from './calibrate-scenes.js';

const STEP = stepWafer();
const PHOTO: Shot = { exposure: 1.6, whiteBalance: [1.15, 1, 0.8], flare: 0.02, noiseSigma: 0.01, seed: 1 };

const photos = new Map<string, Float32Array>();

function calibrate(known: KnownRegion[], fit: CalibrationParameter[], shot: Shot = PHOTO) {
  const key = JSON.stringify(shot);
  const rgb = photos.get(key) ?? asDecoded(shoot(STEP, shot));
  photos.set(key, rgb);
  return calibrateDecoded(rgb, WIDTH, HEIGHT, 'step.png', {
    stack: resolveStack('oxide-on-silicon'),
    stackSpec: 'oxide-on-silicon',
    light: 'D65',
    angleRad: 0,
    known,
    fit,
  });
}

const TRADE_OFF = /film index and thickness trade off with only one known thickness/;

describe('calibrateDecoded() warnings on calibrations the data cannot support', () => {
  it('one known thickness with --fit exposure,index: warns that index and thickness trade off', () => {
    const record = calibrate([{ region: patchRect(3), thicknessNm: 275 }], ['exposure', 'index']);
    expect(record.warnings.some((w) => TRADE_OFF.test(w))).toBe(true);
  });

  it('three rectangles of one thickness (275 nm) with --fit exposure,flare,white-balance,index: trade-off warning, parameters reported as not constrained, no uncertainties', () => {
    const known: KnownRegion[] = [
      { region: [20, 120, 20, 20], thicknessNm: 275 },
      { region: [40, 140, 20, 20], thicknessNm: 275 },
      { region: [60, 160, 20, 20], thicknessNm: 275 },
    ];
    const record = calibrate(known, ['exposure', 'flare', 'white-balance', 'index']);
    expect(record.warnings.some((w) => TRADE_OFF.test(w))).toBe(true);
    expect(record.warnings.some((w) => /cannot constrain indexScale/.test(w))).toBe(true);
    expect((record.uncertainty as Record<string, number | null>).index_scale ?? null).toBeNull();
  });

  it('six different thicknesses with --fit …,index give no trade-off warning (the warning is not always on)', () => {
    const record = calibrate(stepKnownRegions(), ['exposure', 'flare', 'white-balance', 'index'], { ...PHOTO, filmIndexScale: 1.03 });
    expect(record.warnings.filter((w) => TRADE_OFF.test(w) || /cannot constrain/.test(w))).toEqual([]);
  });

  it('one region for exposure, flare and white balance (3 colour values, 6 parameters): flare and white balance held at defaults, and the record says only exposure was fitted', () => {
    const record = calibrate([{ region: patchRect(3), thicknessNm: 275 }], ['exposure', 'flare', 'white-balance']);
    expect(record.warnings).toContain('1 known region(s) give 3 colour values: too few to fit the flare as well; held at its default');
    expect(record.warnings).toContain('1 known region(s) give 3 colour values: too few to fit the white balance as well; held at its default');
    expect(record.fitted_parameters).toEqual(['exposure']);
    const fitted = record.fitted as { white_balance: number[]; flare: number[] };
    expect(fitted.white_balance).toEqual([1, 1, 1]);
    expect(fitted.flare).toEqual([0, 0, 0]);
  });

  it('two regions for all five parameters (6 colour values, 8 parameters): angle, film index and flare are dropped, in that order', () => {
    const known = [
      { region: patchRect(1), thicknessNm: 92 },
      { region: patchRect(3), thicknessNm: 275 },
    ];
    const record = calibrate(known, ['exposure', 'flare', 'white-balance', 'index', 'angle']);
    const dropped = record.warnings.filter((w) => /too few to fit/.test(w)).map((w) => /fit the (.+) as well/.exec(w)?.[1]);
    expect(dropped).toEqual(['angle', 'film index', 'flare']);
    expect(record.fitted_parameters).toEqual(['exposure', 'white-balance']);
  });

  it('a large exposure (×4) clips the bright patches: each clipped region is named with its share, the dark 92 nm patch is not', () => {
    const record = calibrate(stepKnownRegions(), ['exposure', 'flare', 'white-balance'], { ...PHOTO, exposure: 4 });
    const clipped = record.warnings.filter((w) => /clipped \(saturated or black\) pixels/.test(w));
    expect(clipped.length).toBeGreaterThanOrEqual(1);
    expect(clipped.some((w) => w.startsWith('known region 20,20,60,60=0 nm has 100.0 % clipped'))).toBe(true);
    expect(clipped.some((w) => w.includes('=92 nm'))).toBe(false);
    const regions = record.known_regions as Array<{ thickness_nm: number; clipped_fraction: number }>;
    expect(regions.find((r) => r.thickness_nm === 0)?.clipped_fraction).toBe(1);
    expect(regions.find((r) => r.thickness_nm === 92)?.clipped_fraction).toBe(0);
  });

  it('the same photo at exposure 1.6 has no clipped region and no warning', () => {
    const record = calibrate(stepKnownRegions(), ['exposure', 'flare', 'white-balance']);
    expect(record.warnings).toEqual([]);
    for (const r of record.known_regions as Array<{ clipped_fraction: number }>) expect(r.clipped_fraction).toBe(0);
  });

  it('exposure left out of --fit is held at 1, as the warning says', () => {
    const record = calibrate(stepKnownRegions(), ['flare', 'white-balance'], { ...PHOTO, exposure: 1 });
    expect(record.warnings).toContain('exposure not fitted: held at 1');
    expect((record.fitted as { exposure: number }).exposure).toBe(1);
    expect(record.fitted_parameters).toEqual(['flare', 'white-balance']);
  });
});

describe('knownRegionColours(): measuring the known rectangles', () => {
  const width = 40;
  const height = 30;

  it('a uniform rectangle gives its colour exactly, standard error 0 and no clipping', () => {
    const rgb = new Float32Array(width * height * 3).fill(0.5);
    for (let i = 0; i < width * height; i++) rgb[i * 3 + 2] = 0.25;
    const [region] = knownRegionColours(rgb, width, height, [{ region: [5, 5, 10, 8], thicknessNm: 100 }]);
    expect(region.colour).toEqual([0.5, 0.5, 0.25]);
    expect(region.standardError).toEqual([0, 0, 0]);
    expect(region.pixels).toBe(80);
    expect(region.clippedFraction).toBe(0);
  });

  it('the median ignores a dust speck: 10 % black pixels leave the colour unchanged and count as clipped', () => {
    const rgb = new Float32Array(width * height * 3).fill(0.4);
    for (let x = 0; x < 10; x++) rgb[(0 * width + x) * 3] = rgb[(0 * width + x) * 3 + 1] = rgb[(0 * width + x) * 3 + 2] = 0;
    const [region] = knownRegionColours(rgb, width, height, [{ region: [0, 0, 10, 10], thicknessNm: 50 }]);
    expect(region.colour.map((v) => Math.round(v * 1e6) / 1e6)).toEqual([0.4, 0.4, 0.4]);
    expect(region.clippedFraction).toBeCloseTo(0.1, 12);
  });

  it('normal scatter of σ = 0.02: standard error of the median ≈ 1.2533·σ/√n (within 3 %, n = 1000)', () => {
    // Deterministic normal sample: the standard normal quantiles at (i + ½)/n (no random numbers).
    const n = 1000;
    const w = 50;
    const h = 20;
    const sigma = 0.02;
    const rgb = new Float32Array(w * h * 3);
    for (let i = 0; i < n; i++) {
      const z = normalQuantile((i + 0.5) / n);
      for (let c = 0; c < 3; c++) rgb[i * 3 + c] = 0.5 + sigma * z;
    }
    const [region] = knownRegionColours(rgb, w, h, [{ region: [0, 0, w, h], thicknessNm: 10 }]);
    const expected = (1.2533 * sigma) / Math.sqrt(n);
    for (const se of region.standardError) expect(Math.abs(se / expected - 1)).toBeLessThan(0.03);
    for (const v of region.colour) expect(Math.abs(v - 0.5)).toBeLessThan(sigma * 0.01);
  });

  it('throws a UsageError naming --known for no rectangle, a zero-size rectangle, one outside the photo and fractional pixels', () => {
    const rgb = new Float32Array(width * height * 3);
    expect(() => knownRegionColours(rgb, width, height, [])).toThrow(UsageError);
    expect(() => knownRegionColours(rgb, width, height, [])).toThrow(/^--known is required/);
    expect(() => knownRegionColours(rgb, width, height, [{ region: [1, 1, 0, 5], thicknessNm: 10 }])).toThrow(/^--known 1,1,0,5=10: the rectangle has zero size$/);
    expect(() => knownRegionColours(rgb, width, height, [{ region: [35, 0, 10, 5], thicknessNm: 10 }])).toThrow(
      /^--known 35,0,10,5=10: the rectangle lies outside the 40×30 photo$/,
    );
    expect(() => knownRegionColours(rgb, width, height, [{ region: [0, 25, 5, 6], thicknessNm: 10 }])).toThrow(UsageError);
    expect(() => knownRegionColours(rgb, width, height, [{ region: [-1, 0, 5, 5], thicknessNm: 10 }])).toThrow(UsageError);
    expect(() => knownRegionColours(rgb, width, height, [{ region: [1.5, 0, 5, 5], thicknessNm: 10 }])).toThrow(
      /^--known 1\.5,0,5,5=10: X, Y, W and H must be whole numbers of pixels$/,
    );
  });
});

/** Standard normal quantile by bisection on Φ (below). */
function normalQuantile(p: number): number {
  let lo = -10;
  let hi = 10;
  for (let k = 0; k < 80; k++) {
    const mid = (lo + hi) / 2;
    if (normalCdf(mid) < p) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** Φ(z) by the Taylor series of erf (Abramowitz & Stegun 7.1.5), ample for |z| < 4. */
function normalCdf(z: number): number {
  const x = z / Math.SQRT2;
  let term = x;
  let sum = x;
  for (let n = 1; n < 200; n++) {
    term *= (-x * x) / n;
    sum += term / (2 * n + 1);
  }
  return 0.5 + sum / Math.sqrt(Math.PI);
}
