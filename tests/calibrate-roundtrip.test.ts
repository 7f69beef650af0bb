/**
 * calibrateDecoded() on an INVENTED step wafer (six oxide-on-silicon patches, 0–460 nm; our own
 * scenario). Most checks are ROUND TRIPS THROUGH OUR OWN FORWARD MODEL: the photo is rendered by
 * src/render/renderPhoto.ts with known exposure, white-balance gains, flare (and film index scale or
 * angle), 8-bit quantised with seeded Gaussian noise, and the calibration must give them back.
 * Tolerances: 8-bit quantisation puts half a code (~0.002 encoded) on every patch colour, so
 * each parameter must come back within an absolute tolerance stated beside it AND within 4 of
 * its own reported standard uncertainties (the largest miss seen when the tests were written was
 * 3.4 σ, on the blue flare); the uncertainties must be finite, non-zero, and smaller than that
 * tolerance.
 *
 * Outside references:
 * - Fluorescent light with the camera left at daylight: the white-balance gains that turn a
 *   camera balanced for F2 into one balanced for D65 follow from von Kries adaptation in the
 *   Bradford cone space, using the F2 and D65 white points of Westland & Ripamonti, "Computational
 *   Colour Science Using MATLAB", Table 4.2 (shared/refdata/illuminant_white_points.csv) and the
 *   Bradford matrix of Lam (1985) as printed in ICC.1:2004-10 Annex E (values from memory).
 * - The ΔE2000 residual reported per region is recomputed from its two sRGB colours with
 *   color-convert 3.1.3 (npm; rgb.lab.raw, D65 white) and our CIEDE2000 (tested against Sharma,
 *   Wu & Dalal 2005 in colour-deltae.test.ts).
 */
import convert from 'color-convert';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { calibrateDecoded, type CalibrationRecord } from '../src/calibrate/calibrate.js';
import type { CalibrationParameter } from '../src/calibrate/fitCalibration.js';
import { deltaE2000 } from '../src/colour/index.js';
import { sharedPath } from '../src/data/sharedDir.js';
import { camelCaseKeysShallow } from '../src/io/jsonKeys.js';
import { resolveStack } from '../src/optics/index.js';
import { asDecoded, HEIGHT, shoot, stepKnownRegions, stepWafer, WIDTH, type Shot } from './calibrate-scenes.js';

interface Fitted {
  exposure: number;
  whiteBalance: [number, number, number];
  flare: [number, number, number];
  filmIndexScale: number;
  angleDeg: number;
}

const STEP = stepWafer();

type Calibrated = { record: CalibrationRecord; fitted: Fitted; u: Record<string, number | null> };
const done = new Map<string, Calibrated>();

/** Renders the step wafer with `shot` and calibrates it (memoised: some tests share a shot). */
function calibrate(shot: Shot, fit: CalibrationParameter[], light = shot.light ?? 'D65'): Calibrated {
  const key = JSON.stringify([shot, fit, light]);
  const cached = done.get(key);
  if (cached) return cached;
  const record = calibrateDecoded(asDecoded(shoot(STEP, shot)), WIDTH, HEIGHT, 'step.png', {
    stack: resolveStack('oxide-on-silicon'),
    stackSpec: 'oxide-on-silicon',
    light,
    angleRad: 0,
    known: stepKnownRegions(),
    fit,
  });
  // The file's snake_case names (fitted.white_balance, uncertainty.wb_r) read back under the model's names.
  const f = record.fitted as { exposure: number; white_balance: Fitted['whiteBalance']; flare: Fitted['flare']; film_index_scale: number; angle_deg: number };
  const fitted: Fitted = { exposure: f.exposure, whiteBalance: f.white_balance, flare: f.flare, filmIndexScale: f.film_index_scale, angleDeg: f.angle_deg };
  const result = { record, fitted, u: camelCaseKeysShallow<Record<string, number | null>>(record.uncertainty) };
  done.set(key, result);
  return result;
}

/** |fitted − truth| within the absolute tolerance and within 4 reported σ; σ finite, > 0 and < tolerance. */
function expectRecovered(name: string, fitted: number, truth: number, sigma: number | null | undefined, tolerance: number): void {
  expect(sigma, `${name}: standard uncertainty`).toBeTypeOf('number');
  const s = sigma as number;
  expect(Number.isFinite(s) && s > 0, `${name}: σ = ${s} finite and > 0`).toBe(true);
  expect(s, `${name}: σ smaller than the tolerance`).toBeLessThan(tolerance);
  const miss = Math.abs(fitted - truth);
  expect(miss, `${name}: ${fitted} vs ${truth}`).toBeLessThanOrEqual(tolerance);
  expect(miss, `${name}: ${fitted} vs ${truth} within 4σ (σ = ${s})`).toBeLessThanOrEqual(4 * s);
}

const PHOTO = { exposure: 1.6, whiteBalance: [1.15, 1, 0.8] as [number, number, number], flare: [0.02, 0.015, 0.03] as [number, number, number], noiseSigma: 0.01 };
const BASIC: CalibrationParameter[] = ['exposure', 'flare', 'white-balance'];

function expectPhotoRecovered(fitted: Fitted, u: Record<string, number | null>): void {
  expectRecovered('exposure', fitted.exposure, PHOTO.exposure, u.exposure, 0.016); // 1 %
  expectRecovered('white-balance R', fitted.whiteBalance[0], PHOTO.whiteBalance[0], u.wbR, 0.015);
  expectRecovered('white-balance B', fitted.whiteBalance[2], PHOTO.whiteBalance[2], u.wbB, 0.015);
  expect(fitted.whiteBalance[1]).toBe(1);
  expectRecovered('flare R', fitted.flare[0], PHOTO.flare[0], u.flareR, 0.006);
  expectRecovered('flare G', fitted.flare[1], PHOTO.flare[1], u.flareG, 0.006);
  expectRecovered('flare B', fitted.flare[2], PHOTO.flare[2], u.flareB, 0.006);
}

describe('calibrateDecoded(): round trips through our own forward model (invented step wafer, 0–460 nm)', () => {
  for (const seed of [1]) {
    it(`recovers exposure 1.6, gains [1.15, 1, 0.8] and flare [0.02, 0.015, 0.03] within tolerance and 4σ (noise 0.01, seed ${seed})`, () => {
      const { record, fitted, u } = calibrate({ ...PHOTO, seed }, BASIC);
      expectPhotoRecovered(fitted, u);
      expect(record.fitted_parameters).toEqual(BASIC);
      expect(record.warnings).toEqual([]);
      // Not fitted: reported at their defaults, with no uncertainty.
      expect(fitted.filmIndexScale).toBe(1);
      expect(fitted.angleDeg).toBe(0);
      expect(u.indexScale).toBeUndefined();
    });
  }

  it('recovers a film index scale of 1.03 (--fit …,index) within 0.002 and 4σ, with the photo parameters', () => {
    const { record, fitted, u } = calibrate({ ...PHOTO, seed: 1, filmIndexScale: 1.03 }, [...BASIC, 'index']);
    expectRecovered('index scale', fitted.filmIndexScale, 1.03, u.indexScale, 0.002);
    expectPhotoRecovered(fitted, u);
    expect(record.film_index_scale).toBe(fitted.filmIndexScale);
    expect(record.warnings).toEqual([]);
  });

  it('recovers an angle of incidence of 20° (--fit …,angle) within 0.5° and 4σ, with the photo parameters', () => {
    const { record, fitted, u } = calibrate({ ...PHOTO, seed: 1, angleRad: (20 * Math.PI) / 180 }, [...BASIC, 'angle']);
    expectRecovered('angle', fitted.angleDeg, 20, u.angleDeg, 0.5);
    expectPhotoRecovered(fitted, u);
    expect(record.warnings).toEqual([]);
  });

  it('reports per region a small ΔE2000 residual on a clean round trip (< 0.5), which color-convert + CIEDE2000 reproduce', () => {
    const { record } = calibrate({ ...PHOTO, seed: 1 }, BASIC);
    const regions = record.known_regions as Array<{ thickness_nm: number; observed_srgb: number[]; fitted_srgb: number[]; residual_delta_e2000: number; pixels: number }>;
    expect(regions.map((r) => r.thickness_nm)).toEqual([0, 92, 185, 275, 370, 460]);
    for (const r of regions) {
      expect(r.pixels).toBe(3600);
      expect(r.residual_delta_e2000).toBeLessThan(0.5);
      const lab = (rgb: number[]): [number, number, number] => convert.rgb.lab.raw(rgb.map((v) => v * 255) as [number, number, number]);
      // Tolerance 0.02: colours and residual are rounded to 4 decimals in the record.
      expect(Math.abs(deltaE2000(lab(r.observed_srgb), lab(r.fitted_srgb)) - r.residual_delta_e2000)).toBeLessThan(0.02);
    }
  });

  it('the residual shows a model that does not fit: only the exposure fitted on a photo with gains and flare leaves every region above 3 ΔE2000', () => {
    const { record } = calibrate({ ...PHOTO, seed: 1 }, ['exposure']);
    for (const r of record.known_regions as Array<{ residual_delta_e2000: number }>) expect(r.residual_delta_e2000).toBeGreaterThan(3);
  });
});

describe('calibrateDecoded(): fluorescent light with the camera white balance left at daylight', () => {
  // White points, Y = 100 (Westland & Ripamonti Table 4.2, 2° observer).
  const rows = readFileSync(sharedPath('refdata', 'illuminant_white_points.csv'), 'utf8').trim().split('\n').slice(1);
  const white = (name: string): number[] => {
    const row = rows.map((line) => line.split(',')).find((cells) => cells[0] === name);
    if (!row) throw new Error(`no white point for ${name}`);
    return row.slice(1, 4).map(Number);
  };
  // Bradford matrix, Lam (1985), as printed in ICC.1:2004-10 Annex E (from memory).
  const BRADFORD = [
    [0.8951, 0.2664, -0.1614],
    [-0.7502, 1.7135, 0.0367],
    [0.0389, -0.0685, 1.0296],
  ];
  const cone = (xyz: number[]): number[] => BRADFORD.map((row) => row[0] * xyz[0] + row[1] * xyz[1] + row[2] * xyz[2]);

  it('gives the von Kries (Bradford) gains of F2 against D65 within 0.01, and exposure × the middle gain within 1 %', () => {
    // Invented shot: F2 light, camera at D65, exposure 1.7, grey flare 0.02, noise 0.008.
    const { record, fitted, u } = calibrate({ light: 'F2', whiteBalanceLight: 'D65', exposure: 1.7, flare: 0.02, noiseSigma: 0.008, seed: 2 }, BASIC);
    const f2 = cone(white('F2'));
    const d65 = cone(white('D65'));
    const gains = f2.map((v, i) => v / d65[i]);
    expect(fitted.whiteBalance[0]).toBeCloseTo(gains[0] / gains[1], 2);
    expect(Math.abs(fitted.whiteBalance[0] - gains[0] / gains[1])).toBeLessThan(0.01);
    expect(Math.abs(fitted.whiteBalance[2] - gains[2] / gains[1])).toBeLessThan(0.01);
    expect(Math.abs(fitted.exposure / (1.7 * gains[1]) - 1)).toBeLessThan(0.01);
    for (const c of [0, 1, 2]) expect(Math.abs(fitted.flare[c] - 0.02)).toBeLessThan(0.006);
    for (const key of ['exposure', 'wbR', 'wbB', 'flareR', 'flareG', 'flareB']) expect(u[key]).toBeGreaterThan(0);
    expect(record.warnings).toEqual([]);
    expect((record.applies_to as Record<string, unknown>).light).toBe('F2');
  });
});
