/**
 * Round trips (render with our own forward model, invert, compare) on invented thickness fields
 * of a draining soap film, photographed under the mercury 546.07 nm line (wavelength from memory).
 * The forward model itself is checked against outside references in mono-scheludko.test.ts and
 * mono-line.test.ts.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { branchOfThickness, type LineReflectanceTable } from '../src/mono/lineReflectanceTable.js';
import { mapLineIntensity, type MonoMapResult } from '../src/mono/mapLineIntensity.js';
import { mapMonochromatic } from '../src/mono/mapMonochromatic.js';
import { stackLineTable } from '../src/mono/stackLineReflectance.js';
import { PixelStatus, type MapOptions } from '../src/map/types.js';
import { resolveStack } from '../src/optics/resolveStack.js';
import { createUniform } from '../src/colour/seededNormal.js';

const LINE_NM = 546.07;
const W = 200;
const H = 150;
const stack = resolveStack('soap-film');
const table = stackLineTable(stack, LINE_NM, { angleRad: 0, maxThicknessNm: 1500 });

function options(extra: Partial<MapOptions> = {}): MapOptions {
  return { stack, angleRad: 0, light: `line:${LINE_NM}`, thinBelowNm: 30, maxThicknessNm: 1500, ...extra };
}

/** Deterministic normal deviates: the project's seeded uniform stream (mulberry32) through Box–Muller. */
function normalSource(seed: number): () => number {
  const uniform = createUniform(seed);
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
}

function encodeSrgb(linear: number): number {
  const v = Math.min(1, Math.max(0, linear));
  return v <= 0.0031308 ? 12.92 * v : 1.055 * Math.pow(v, 1 / 2.4) - 0.055;
}

function reflectanceAt(t: LineReflectanceTable, hNm: number): number {
  const x = hNm / t.stepNm;
  const i = Math.min(t.reflectance.length - 2, Math.floor(x));
  return t.reflectance[i] + (x - i) * (t.reflectance[i + 1] - t.reflectance[i]);
}

/**
 * Invented draining film: thin at the top, thickening downwards (h ∝ depth^1.4), a gentle
 * sideways swell, and optionally a Newton black film (5 nm) where the film would be thinner
 * than 25 nm. Photo: linear = gain_c · (1 − vignette · r²) · R(h) + flare, Gaussian noise, sRGB
 * encoding, 8-bit.
 */
function render(opts: {
  width?: number;
  height?: number;
  topNm: number;
  bottomNm: number;
  blackFilm: boolean;
  gains?: [number, number, number];
  flare?: number;
  noise?: number;
  seed?: number;
  channelTwist?: boolean;
  vignette?: number;
  swellNm?: number;
}) {
  const W = opts.width ?? 200;
  const H = opts.height ?? 150;
  const truth = new Float32Array(W * H);
  const rgb = new Float32Array(3 * W * H);
  const gains = opts.gains ?? [0.62 / table.levelMax, 0.62 / table.levelMax, 0.62 / table.levelMax];
  const flare = opts.flare ?? 0.015;
  const noise = opts.noise ?? 0.004;
  const gauss = normalSource(opts.seed ?? 7);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const depth = y / (H - 1);
      let h = opts.topNm + (opts.bottomNm - opts.topNm) * Math.pow(depth, 1.4);
      h += (opts.swellNm ?? 18) * Math.sin((2 * Math.PI * x) / W) * depth;
      if (opts.blackFilm && h < 25) h = 5;
      const p = y * W + x;
      truth[p] = h;
      const R = reflectanceAt(table, h);
      for (let c = 0; c < 3; c++) {
        // Uneven lighting: the gain falls by `vignette` from the centre to the corners.
        const r2 = ((x - W / 2) ** 2 + (y - H / 2) ** 2) / ((W / 2) ** 2 + (H / 2) ** 2);
        let linear = gains[c] * (1 - (opts.vignette ?? 0) * r2) * R + flare;
        // A broadband light would colour the fringes: let one channel follow a shifted pattern.
        if (opts.channelTwist && c === 2) linear = gains[c] * reflectanceAt(table, h * 0.8) + flare;
        linear += noise * gauss();
        rgb[3 * p + c] = Math.round(255 * encodeSrgb(linear)) / 255;
      }
    }
  }
  const isGrey = !opts.gains && !opts.channelTwist;
  if (isGrey) for (let p = 0; p < W * H; p++) rgb[3 * p + 1] = rgb[3 * p + 2] = rgb[3 * p];
  return { photo: { width: W, height: H, rgb, isGrey }, truth };
}

/** Distance (nm) from `hNm` to the nearest extreme of R(h) (a branch boundary of the table). */
function distanceToExtremeNm(hNm: number): number {
  let best = Infinity;
  for (const i of table.boundaryIndex) best = Math.min(best, Math.abs(i * table.stepNm - hNm));
  return best;
}

/**
 * Scores against the true field. Fringe order: at a crest or trough of a fringe the intensity
 * cannot tell the two sides apart, and noise moves the estimate across the extreme; so the order
 * is scored (a) exactly (same monotonic branch) on pixels more than 25 nm from an extreme, and
 * (b) on all pixels as "same branch, or within 15 nm of the truth" (a real order error puts the
 * estimate on another branch, at least twice its distance from the extreme away).
 */
function score(result: MonoMapResult, truth: Float32Array) {
  const thinErrors: number[] = [];
  let ok = 0;
  let film = 0;
  let slopePixels = 0;
  let slopeRight = 0;
  let allRight = 0;
  for (let p = 0; p < truth.length; p++) {
    if (result.status[p] !== PixelStatus.excluded) film++;
    if (result.status[p] !== PixelStatus.ok) continue;
    ok++;
    const est = result.thicknessNm[p];
    const err = est - truth[p];
    if (truth[p] < 100) thinErrors.push(Math.abs(err));
    const sameBranch = branchOfThickness(table, est) === branchOfThickness(table, truth[p]);
    if (distanceToExtremeNm(truth[p]) > 25) {
      slopePixels++;
      if (sameBranch) slopeRight++;
    }
    if (sameBranch || Math.abs(err) < 15) allRight++;
  }
  thinErrors.sort((a, b) => a - b);
  return {
    medianThinErrorNm: thinErrors[thinErrors.length >> 1],
    thinCount: thinErrors.length,
    slopeOrderShare: slopeRight / slopePixels,
    orderShare: allRight / ok,
    okShare: ok / film,
  };
}

describe('mapLineIntensity() round trip on an invented draining soap film at 546.07 nm', () => {
  it('finds the black film, counts orders and measures < 100 nm within 2 nm median (no anchor)', () => {
    const { photo, truth } = render({ topNm: 0, bottomNm: 900, blackFilm: true });
    const result = mapLineIntensity(photo, options(), table);
    const s = score(result, truth);
    expect(result.line.orderFrom).toBe('black-film');
    expect(result.line.scaleFrom).toBe('image');
    expect(s.thinCount).toBeGreaterThan(1000);
    expect(s.medianThinErrorNm).toBeLessThan(2);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.99);
    expect(s.slopeOrderShare).toBeGreaterThanOrEqual(0.99);
    expect(s.okShare).toBeGreaterThan(0.85);
    // The Newton black film (5 nm) is below the dark limit: counted as dark, i.e. thin.
    expect(result.status[5 * W + 100]).toBe(PixelStatus.dark);
    expect(result.darkLimitNm).toBeGreaterThan(5);
    expect(result.stats.thin_fraction).toBeGreaterThan(0);
  });

  it('follows uneven lighting (gain 25 % lower in the corners) with the local fringe envelope', () => {
    const { photo, truth } = render({ topNm: 0, bottomNm: 900, blackFilm: true, vignette: 0.25, seed: 21 });
    const s = score(mapLineIntensity(photo, options(), table), truth);
    expect(s.medianThinErrorNm).toBeLessThan(2);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.99);
    expect(s.slopeOrderShare).toBeGreaterThanOrEqual(0.99);
  });

  it('finds broad fringes (a gentle slope photographed large: fringes ~250 px apart)', () => {
    const { photo, truth } = render({ width: 120, height: 600, topNm: 0, bottomNm: 500, blackFilm: true, swellNm: 0, seed: 8 });
    const result = mapLineIntensity(photo, options(), table);
    const s = score(result, truth);
    expect(result.line.scaleFrom).toBe('image');
    expect(s.medianThinErrorNm).toBeLessThan(2);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.99);
  });

  it('uses an anchor when there is no black film, and recovers gain and flare', () => {
    const { photo, truth } = render({ topNm: 60, bottomNm: 1000, blackFilm: false, seed: 11 });
    const anchor = { x: 100, y: 0, thicknessNm: truth[100] };
    const result = mapLineIntensity(photo, options({ anchors: [anchor] }), table);
    const s = score(result, truth);
    expect(result.line.orderFrom).toBe('anchor');
    expect(s.medianThinErrorNm).toBeLessThan(2);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.99);
    expect(s.slopeOrderShare).toBeGreaterThanOrEqual(0.99);
    expect(s.okShare).toBeGreaterThan(0.85);
    expect(Math.abs(result.fitted.exposure * table.levelMax - 0.62)).toBeLessThan(0.03);
    expect(Math.abs(result.fitted.flare[0] - 0.015)).toBeLessThan(0.01);
    // Reported fringe extremes: true bright level 0.62 + 0.015, dark level 0.015 (linear).
    expect(Math.abs(result.line.intensityMax - 0.635)).toBeLessThan(0.01);
    expect(Math.abs(result.line.intensityMin - 0.015)).toBeLessThan(0.005);
    expect(result.extra).toMatchObject({ mode: 'monochromatic', line_nm: LINE_NM, order_from: 'anchor', intensity_scale_from: 'bright and dark fringes of this photo' });
  });

  it('without anchor or black film counts from the thinnest part and says so', () => {
    const { photo, truth } = render({ topNm: 60, bottomNm: 1000, blackFilm: false, seed: 12 });
    const result = mapLineIntensity(photo, options(), table);
    expect(result.line.orderFrom).toBe('assumed-first-order');
    expect(result.warnings.join(' ')).toMatch(/thinnest part of the film is in the first order/);
    const s = score(result, truth);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.99);
    expect(s.slopeOrderShare).toBeGreaterThanOrEqual(0.99);
  });

  it('a colour photo under the line (unequal channel gains) works without a warning', () => {
    const g = 0.7 / table.levelMax;
    const { photo, truth } = render({ topNm: 0, bottomNm: 900, blackFilm: true, gains: [g, 0.8 * g, 0.15 * g], seed: 3 });
    const result = mapLineIntensity(photo, options(), table);
    expect(result.warnings.join(' ')).not.toMatch(/may not be monochromatic/);
    expect(score(result, truth).medianThinErrorNm).toBeLessThan(2);
  });

  it('warns when colour channels disagree (light may not be monochromatic)', () => {
    const g = 0.6 / table.levelMax;
    const { photo } = render({ topNm: 0, bottomNm: 900, blackFilm: true, gains: [g, g, g], channelTwist: true });
    const result = mapLineIntensity(photo, options(), table);
    expect(result.warnings.join(' ')).toMatch(/light may not be monochromatic/);
  });
});

describe('mapLineIntensity() fringe-order checks that must be able to fail', () => {
  it('an anchor one branch off (wrong order) gives wrong orders almost everywhere', () => {
    const { photo, truth } = render({ topNm: 60, bottomNm: 1000, blackFilm: false, seed: 11 });
    // True thickness at the anchor ~60 nm (branch 0); claim the mirror value on branch 1.
    const wrong = { x: 100, y: 0, thicknessNm: 2 * (table.boundaryIndex[1] * table.stepNm) - truth[100] };
    const result = mapLineIntensity(photo, options({ anchors: [wrong] }), table);
    expect(score(result, truth).slopeOrderShare).toBeLessThan(0.2);
  });

  it('marks fringes too dense to count as ambiguous and keeps the count right elsewhere', () => {
    // Invented field: 5 nm/px downwards, plus 60 nm/px sideways right of x = 120 (fringe period ~3 px).
    const truth = new Float32Array(W * H);
    const rgb = new Float32Array(3 * W * H);
    const gauss = normalSource(3);
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const p = y * W + x;
        const h = Math.min(1450, 40 + 5 * y + Math.max(0, x - 120) * 60);
        truth[p] = h;
        const v = Math.round(255 * encodeSrgb((0.62 / table.levelMax) * reflectanceAt(table, h) + 0.015 + 0.004 * gauss())) / 255;
        rgb[3 * p] = rgb[3 * p + 1] = rgb[3 * p + 2] = v;
      }
    }
    const result = mapLineIntensity({ width: W, height: H, rgb, isGrey: true }, options({ anchors: [{ x: 10, y: 0, thicknessNm: 40 }] }), table);
    expect(result.warnings.join(' ')).toMatch(/fringes too dense to count/);
    let ambiguousRight = 0;
    let leftWrong = 0;
    let leftOk = 0;
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const p = y * W + x;
        if (x > 125 && x < 140 && result.status[p] === PixelStatus.ambiguous) ambiguousRight++;
        if (x < 110 && result.status[p] === PixelStatus.ok) {
          leftOk++;
          if (Math.abs(result.thicknessNm[p] - truth[p]) > 15) leftWrong++;
        }
      }
    }
    expect(ambiguousRight).toBeGreaterThan(0.9 * 14 * H);
    expect(leftOk).toBeGreaterThan(0.95 * 110 * H);
    expect(leftWrong / leftOk).toBeLessThan(0.01);
  });
});

describe('mapLineIntensity() in a photo series (previous frame as order prior)', () => {
  // Invented frame: 300–1000 nm, so no first-order fringe is visible and the default assumption
  // ("thinnest part in the first order") must fail; the previous frame (truth + 15 nm, the film
  // having drained a little since) fixes the count.
  const { photo, truth } = render({ topNm: 300, bottomNm: 1000, blackFilm: false, seed: 31 });
  it('without a prior the assumed first order is wrong here (and says it assumed)', () => {
    const result = mapLineIntensity(photo, options(), table);
    expect(result.line.orderFrom).toBe('assumed-first-order');
    expect(score(result, truth).slopeOrderShare).toBeLessThan(0.5);
  });
  it('with the previous frame as prior the orders are right', () => {
    const prior = truth.map((h) => h + 15);
    const result = mapLineIntensity(photo, options({ prior }), table);
    expect(result.line.orderFrom).toBe('series-prior');
    const s = score(result, truth);
    expect(s.slopeOrderShare).toBeGreaterThanOrEqual(0.99);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.99);
  });
  it('rejects a prior of the wrong size', () => {
    expect(() => mapLineIntensity(photo, options({ prior: new Float32Array(10) }), table)).toThrow(/prior must be a thickness map of 30000 pixels/);
  });
});

describe('mapLineIntensity() round trip for oxide on silicon (transfer-matrix table, bare Si bright)', () => {
  // Invented bevel: thermal oxide etched to a wedge 20 → 700 nm across the frame, under the
  // Na 589.3 nm line (wavelength from memory), unknown gain and flare, 8-bit.
  const oxide = resolveStack('oxide-on-silicon');
  const oxideTable = stackLineTable(oxide, 589.3, { angleRad: 0, maxThicknessNm: 1000 });
  it('measures the wedge with the right orders from an anchor at the thin end', () => {
    const truth = new Float32Array(W * H);
    const rgb = new Float32Array(3 * W * H);
    const gauss = normalSource(41);
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const p = y * W + x;
        const h = 20 + (680 * x) / (W - 1) + 10 * Math.sin((2 * Math.PI * y) / H);
        truth[p] = h;
        const R = reflectanceAt(oxideTable, h);
        const v = Math.round(255 * encodeSrgb((0.8 / oxideTable.levelMax) * R + 0.01 + 0.004 * gauss())) / 255;
        rgb[3 * p] = rgb[3 * p + 1] = rgb[3 * p + 2] = v;
      }
    }
    const result = mapLineIntensity(
      { width: W, height: H, rgb, isGrey: true },
      { stack: oxide, angleRad: 0, light: 'line:589.3', thinBelowNm: null, maxThicknessNm: 1000, anchors: [{ x: 0, y: 0, thicknessNm: 20 }] },
      oxideTable,
    );
    let ok = 0;
    let right = 0;
    const errors: number[] = [];
    for (let p = 0; p < truth.length; p++) {
      if (result.status[p] !== PixelStatus.ok) continue;
      ok++;
      const err = Math.abs(result.thicknessNm[p] - truth[p]);
      errors.push(err);
      if (branchOfThickness(oxideTable, result.thicknessNm[p]) === branchOfThickness(oxideTable, truth[p]) || err < 15) right++;
    }
    errors.sort((a, b) => a - b);
    expect(ok / truth.length).toBeGreaterThan(0.95);
    expect(right / ok).toBeGreaterThanOrEqual(0.99);
    expect(errors[errors.length >> 1]).toBeLessThan(2);
  });
});

describe('mapLineIntensity() round trip on an invented dimpled foam film (circular mask)', () => {
  /** h(r) = 30 + dimpleNm (1 − r²/R²)² nm inside a 90 px circle; outside is the holder (masked). */
  function dimpledFilm(dimpleNm: number) {
    const size = 200;
    const radius = 90;
    const truth = new Float32Array(size * size).fill(NaN);
    const rgb = new Float32Array(3 * size * size);
    const mask = new Uint8Array(size * size);
    const gauss = normalSource(17);
    for (let y = 0; y < size; y++) {
      for (let x = 0; x < size; x++) {
        const p = y * size + x;
        const r2 = ((x - 100) ** 2 + (y - 100) ** 2) / radius ** 2;
        let linear = 0.02;
        if (r2 <= 1) {
          mask[p] = 1;
          truth[p] = 30 + dimpleNm * (1 - r2) ** 2;
          linear = (0.6 / table.levelMax) * reflectanceAt(table, truth[p]) + 0.015 + 0.004 * gauss();
        }
        rgb[3 * p] = rgb[3 * p + 1] = rgb[3 * p + 2] = Math.round(255 * encodeSrgb(linear)) / 255;
      }
    }
    return { photo: { width: size, height: size, rgb, isGrey: true }, truth, mask };
  }
  it('counts the rings of a film thinning outwards, first order at the rim', () => {
    const { photo, truth, mask } = dimpledFilm(1000);
    const result = mapLineIntensity(photo, options(), table, mask);
    expect(result.status[0]).toBe(PixelStatus.excluded);
    const s = score(result, truth);
    expect(s.okShare).toBeGreaterThan(0.95);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.99);
  });
  it('puts a dimple top just past a bright extreme (322 nm, extreme at ~307 nm) on the far side', () => {
    const { photo, truth, mask } = dimpledFilm(292);
    const result = mapLineIntensity(photo, options(), table, mask);
    const s = score(result, truth);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.99);
    // The top beyond 316 nm (9 nm or more past the extreme) must be on the far branch; without
    // the cap crossing it would sit on the near side, mirrored about the extreme.
    let top = 0;
    let far = 0;
    for (let p = 0; p < truth.length; p++) {
      if (!(truth[p] > 316) || result.status[p] !== PixelStatus.ok) continue;
      top++;
      if (branchOfThickness(table, result.thicknessNm[p]) === branchOfThickness(table, truth[p])) far++;
    }
    expect(top).toBeGreaterThan(50);
    expect(far / top).toBeGreaterThan(0.9);
  });
  it('keeps a dimple top just short of the extreme (297 nm) on the near side', () => {
    const { photo, truth, mask } = dimpledFilm(267);
    const s = score(mapLineIntensity(photo, options(), table, mask), truth);
    expect(s.orderShare).toBeGreaterThanOrEqual(0.995);
  });
});

describe('mapLineIntensity() intensity scale', () => {
  const thin = render({ topNm: 10, bottomNm: 85, blackFilm: false, seed: 5 });
  it('throws when no fringe extreme is visible and no calibration is given', () => {
    expect(() => mapLineIntensity(thin.photo, options(), table)).toThrow(/intensity scale is unknown/);
  });
  it('measures a film without extremes from a calibration (exposure, flare)', () => {
    const gain = 0.62 / table.levelMax;
    const result = mapLineIntensity(
      thin.photo,
      options({ exposureFixed: { exposure: gain, whiteBalance: [1, 1, 1], flare: [0.015, 0.015, 0.015] }, anchors: [{ x: 0, y: 0, thicknessNm: 10 }] }),
      table,
    );
    expect(result.line.scaleFrom).toBe('calibration');
    const s = score(result, thin.truth);
    expect(s.medianThinErrorNm).toBeLessThan(2);
    expect(s.okShare).toBeGreaterThan(0.9);
  });
});

describe('mapLineIntensity() edge cases', () => {
  const calibrated = options({ exposureFixed: { exposure: 0.62 / table.levelMax, whiteBalance: [1, 1, 1], flare: [0.015, 0.015, 0.015] } });
  it('maps a 1×1 photo from a calibration (first order assumed)', () => {
    // 60 nm water film: R from our table, encoded like a camera would.
    const v = encodeSrgb((0.62 / table.levelMax) * reflectanceAt(table, 60) + 0.015);
    const result = mapLineIntensity({ width: 1, height: 1, rgb: Float32Array.of(v, v, v), isGrey: true }, calibrated, table);
    expect(result.status[0]).toBe(PixelStatus.ok);
    expect(result.thicknessNm[0]).toBeCloseTo(60, 0);
  });
  it('refuses a 1×1 photo without calibration: the intensity scale is unknown', () => {
    expect(() => mapLineIntensity({ width: 1, height: 1, rgb: Float32Array.of(0.5, 0.5, 0.5), isGrey: true }, options(), table)).toThrow(/intensity scale is unknown/);
  });
  it('says so when the mask excludes every pixel', () => {
    const { photo } = render({ topNm: 0, bottomNm: 900, blackFilm: true });
    expect(() => mapLineIntensity(photo, calibrated, table, new Uint8Array(W * H))).toThrow(/no film pixels to measure/);
  });
  it('rejects a photo whose rgb does not match its size', () => {
    expect(() => mapLineIntensity({ width: 2, height: 2, rgb: new Float32Array(5), isGrey: true }, calibrated, table)).toThrow(/photo.rgb must be a Float32Array of 12 values/);
  });
});

describe('mapMonochromatic() entry point', () => {
  it('rejects a line outside 380–780 nm', () => {
    const { photo } = render({ topNm: 0, bottomNm: 900, blackFilm: true });
    expect(() => mapMonochromatic(photo, options(), 300)).toThrow(/between 380 and 780 nm \(visible light\), received 300/);
  });
  it('marks pixels outside the region as excluded and clipped pixels as saturated', () => {
    const { photo } = render({ topNm: 0, bottomNm: 900, blackFilm: true });
    photo.rgb[3 * (140 * W + 50)] = 1;
    const result = mapMonochromatic(photo, options({ region: [0, 0, W, 145] }), LINE_NM);
    expect(result.status[146 * W + 10]).toBe(PixelStatus.excluded);
    expect(result.status[140 * W + 50]).toBe(PixelStatus.saturated);
    expect(Number.isNaN(result.thicknessNm[146 * W + 10])).toBe(true);
  });
  it('reads a narrow-band light from an SPD file and models it over its band', () => {
    // Demo SPD file (our scenario): Gaussian band, FWHM 12 nm at 589 nm, 1 nm steps.
    const dir = mkdtempSync(join(tmpdir(), 'lamella-mono-'));
    const file = join(dir, 'filtered-led.csv');
    const rows = ['wavelength_nm,relative_spd'];
    for (let w = 380; w <= 780; w++) rows.push(`${w},${Math.exp(-0.5 * ((w - 589) / (12 / 2.3548)) ** 2).toFixed(6)}`);
    writeFileSync(file, rows.join('\n') + '\n');
    try {
      const bandTable = stackLineTable(stack, 589, {
        angleRad: 0,
        maxThicknessNm: 1500,
        band: { wavelengthsNm: rows.slice(1).map((r) => Number(r.split(',')[0])), values: rows.slice(1).map((r) => Number(r.split(',')[1])) },
        bandHalfWidthNm: 20,
      });
      // Render through the band-averaged model, map through the entry point with the file as light.
      const W2 = 200;
      const H2 = 150;
      const truth = new Float32Array(W2 * H2);
      const rgb = new Float32Array(3 * W2 * H2);
      const gauss = normalSource(51);
      for (let y = 0; y < H2; y++) {
        for (let x = 0; x < W2; x++) {
          const p = y * W2 + x;
          let h = 1200 * Math.pow(y / (H2 - 1), 1.4) + 18 * Math.sin((2 * Math.PI * x) / W2);
          if (h < 25) h = 5;
          truth[p] = h;
          const v = Math.round(255 * encodeSrgb((0.62 / bandTable.levelMax) * reflectanceAt(bandTable, h) + 0.015 + 0.004 * gauss())) / 255;
          rgb[3 * p] = rgb[3 * p + 1] = rgb[3 * p + 2] = v;
        }
      }
      const result = mapMonochromatic({ width: W2, height: H2, rgb, isGrey: true }, { ...options(), light: file }, 589);
      expect(result.line.lineNm).toBe(589);
      let ok = 0;
      let right = 0;
      for (let p = 0; p < truth.length; p++) {
        if (result.status[p] !== PixelStatus.ok) continue;
        ok++;
        if (Math.abs(result.thicknessNm[p] - truth[p]) < 15) right++;
      }
      expect(ok / truth.length).toBeGreaterThan(0.9);
      expect(right / ok).toBeGreaterThanOrEqual(0.99);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
  it('refuses a broadband light (D65) in the monochromatic entry point', () => {
    const { photo } = render({ topNm: 0, bottomNm: 900, blackFilm: true });
    expect(() => mapMonochromatic(photo, { ...options(), light: 'D65' }, 546)).toThrow(/light D65 is not monochromatic/);
  });
  it('rejects an anchor outside the photo with a message naming it', () => {
    const { photo } = render({ topNm: 0, bottomNm: 900, blackFilm: true });
    expect(() => mapMonochromatic(photo, options({ anchors: [{ x: 500, y: 2, thicknessNm: 10 }] }), LINE_NM)).toThrow(/anchor 500,2=10/);
  });
});
