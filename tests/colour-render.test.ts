import { describe, expect, it } from 'vitest';
import {
  buildCamera,
  checkPhotoFormation,
  createNormal,
  createSrgbEncoder,
  encodedCodeTable,
  normalQuantileTable,
  linearToSrgb16,
  encodeSrgb,
  filmColourTable,
  linearToSrgb8,
  predictEncodedPixel,
  resolveLight,
  srgb8ToLinear,
  whiteBalanceMatrix,
  encodeLinear,
  ADAPTATION_MATRICES,
  applyMatrix3,
  chromaticAdaptationMatrix,
  invertMatrix3,
  multiplyMatrix3,
  XYZ_TO_LINEAR_SRGB,
} from '../src/colour/index.js';
import { resolveStack } from '../src/optics/index.js';
import { chartTable } from '../src/render/chartTable.js';
import { renderPhoto } from '../src/render/renderPhoto.js';

const stack = resolveStack('oxide-on-silicon');
const light = resolveLight('F11');

describe('renderPhoto() against chartTable() (round trip within our own forward model)', () => {
  it('a thickness ramp 0–1000 nm renders exactly the chart colours (8-bit codes within 1)', () => {
    const width = 1001;
    const ramp = new Float32Array(width).map((_, i) => i);
    const { data, warnings } = renderPhoto(ramp, width, 1, { stack, light, angleRad: 0 });
    const chart = chartTable({ stack, light, angleRad: 0, fromNm: 0, toNm: 1000, stepNm: 1 });
    expect(warnings).toEqual([]);
    let worst = 0;
    for (let i = 0; i < width * 3; i++) worst = Math.max(worst, Math.abs(data[i] - chart.srgb8[i]));
    expect(worst).toBeLessThanOrEqual(1);
  });
  it('between table rows the lookup matches a direct spectral computation within 0.5 of an 8-bit code', () => {
    const thicknesses = [123.37, 456.789, 987.01];
    const { data } = renderPhoto(Float32Array.from(thicknesses), 3, 1, { stack, light, angleRad: 0, bitDepth: 16 });
    const camera = buildCamera({ light });
    const direct = filmColourTable(stack, camera, Float64Array.from(thicknesses, (d) => Math.fround(d)), 0);
    for (let i = 0; i < 9; i++) expect(Math.abs(data[i] / 257 - encodeSrgb(Math.min(1, Math.max(0, direct[i]))) * 255)).toBeLessThan(0.5);
  });
});

describe('renderPhoto() edge cases', () => {
  it('NaN pixels are black and counted in a warning', () => {
    const map = Float32Array.of(100, Number.NaN, 200, Number.NaN);
    const { data, warnings } = renderPhoto(map, 2, 2, { stack, light });
    expect(warnings).toEqual(['2 pixels with no thickness (NaN) rendered black']);
    expect(Array.from(data.slice(3, 6))).toEqual([0, 0, 0]);
    expect(data[0] + data[1] + data[2]).toBeGreaterThan(0);
  });
  it('negative and infinite thicknesses are black and counted separately', () => {
    const { warnings } = renderPhoto(Float32Array.of(-5, Number.POSITIVE_INFINITY, 50), 3, 1, { stack, light });
    expect(warnings).toEqual(['2 pixels with negative or infinite thickness rendered black']);
  });
  it('an all-NaN map renders black without building a table', () => {
    const { data, warnings } = renderPhoto(Float32Array.of(Number.NaN), 1, 1, { stack, light });
    expect(Array.from(data)).toEqual([0, 0, 0]);
    expect(warnings).toHaveLength(1);
  });
  it('a 1×1 map of one thickness works', () => {
    const { data } = renderPhoto(Float32Array.of(300), 1, 1, { stack, light });
    expect(data.length).toBe(3);
  });
  it('a size mismatch names the sizes', () => {
    expect(() => renderPhoto(new Float32Array(5), 2, 2, { stack, light })).toThrow('thicknessNm must hold width × height = 4 values, received 5');
  });
  it('a Float64Array is refused with a TypeError', () => {
    expect(() => renderPhoto(new Float64Array(4) as unknown as Float32Array, 2, 2, { stack, light })).toThrow(TypeError);
  });
  it('16-bit output agrees with 8-bit output (code/257 within 0.5 + rounding)', () => {
    const ramp = new Float32Array(200).map((_, i) => i * 3);
    const eight = renderPhoto(ramp, 200, 1, { stack, light }).data;
    const sixteen = renderPhoto(ramp, 200, 1, { stack, light, bitDepth: 16 }).data;
    expect(sixteen).toBeInstanceOf(Uint16Array);
    for (let i = 0; i < eight.length; i++) expect(Math.abs(sixteen[i] / 257 - eight[i])).toBeLessThanOrEqual(0.51);
  });
});

describe('photo formation (exposure, flare, white-balance gains, noise)', () => {
  const flat = new Float32Array(40000).fill(250);
  const base = renderPhoto(Float32Array.of(250), 1, 1, { stack, light, bitDepth: 16 }).data;
  const linear = Array.from(base, (v) => srgb8ToLinear(v / 257));
  it('exposure 0.5 halves every linear channel', () => {
    const half = renderPhoto(Float32Array.of(250), 1, 1, { stack, light, bitDepth: 16, exposure: 0.5 }).data;
    for (let c = 0; c < 3; c++) expect(srgb8ToLinear(half[c] / 257)).toBeCloseTo(linear[c] / 2, 4);
  });
  it('flare adds per channel in linear units', () => {
    const lit = renderPhoto(Float32Array.of(250), 1, 1, { stack, light, bitDepth: 16, flare: [0.05, 0, 0.02] }).data;
    expect(srgb8ToLinear(lit[0] / 257)).toBeCloseTo(linear[0] + 0.05, 4);
    expect(srgb8ToLinear(lit[1] / 257)).toBeCloseTo(linear[1], 4);
    expect(srgb8ToLinear(lit[2] / 257)).toBeCloseTo(linear[2] + 0.02, 4);
  });
  it('equal white-balance gains scale every channel alike', () => {
    const gained = renderPhoto(Float32Array.of(250), 1, 1, { stack, light, bitDepth: 16, whiteBalance: [0.8, 0.8, 0.8] }).data;
    for (let c = 0; c < 3; c++) expect(srgb8ToLinear(gained[c] / 257)).toBeCloseTo(linear[c] * 0.8, 4);
  });
  it('white-balance gains act in the Bradford cone space: gains from two whites equal the Bradford adaptation between them (identity, Lam 1985)', () => {
    // Gains ρ(D65)/ρ(A) in Bradford space must reproduce P⁻¹·CAT(A→D65)·P on linear sRGB.
    const whiteA = [109.85, 100, 35.585]; // Westland & Ripamonti 2004, Table 4.2
    const whiteD65 = [95.047, 100, 108.883];
    const m = ADAPTATION_MATRICES.bradford;
    const coneA = applyMatrix3(m, whiteA);
    const coneD65 = applyMatrix3(m, whiteD65);
    const gains: [number, number, number] = [coneD65[0] / coneA[0], coneD65[1] / coneA[1], coneD65[2] / coneA[2]];
    const viaGains = whiteBalanceMatrix(gains);
    const cat = chromaticAdaptationMatrix(whiteA, whiteD65);
    const expected = multiplyMatrix3(XYZ_TO_LINEAR_SRGB, multiplyMatrix3(cat, invertMatrix3(XYZ_TO_LINEAR_SRGB)));
    for (let i = 0; i < 9; i++) expect(viaGains[i]).toBeCloseTo(expected[i], 12);
    const identity = whiteBalanceMatrix([1, 1, 1]);
    for (let i = 0; i < 9; i++) expect(identity[i]).toBeCloseTo(i % 4 === 0 ? 1 : 0, 12);
    expect(Array.from(whiteBalanceMatrix([2, 3, 4], 'linear'))).toEqual([2, 0, 0, 0, 3, 0, 0, 0, 4]);
  });
  it('noise of σ = 0.01 gives a sample standard deviation of 0.01 ± 5 % in linear units; same seed, same image', () => {
    const a = renderPhoto(flat, 200, 200, { stack, light, bitDepth: 16, noiseSigma: 0.01, seed: 7 }).data;
    const b = renderPhoto(flat, 200, 200, { stack, light, bitDepth: 16, noiseSigma: 0.01, seed: 7 }).data;
    const c = renderPhoto(flat, 200, 200, { stack, light, bitDepth: 16, noiseSigma: 0.01, seed: 8 }).data;
    expect(Buffer.from(a.buffer).equals(Buffer.from(b.buffer))).toBe(true);
    expect(Buffer.from(a.buffer).equals(Buffer.from(c.buffer))).toBe(false);
    let sum = 0;
    let sumSq = 0;
    const n = flat.length;
    for (let p = 0; p < n; p++) {
      const v = srgb8ToLinear(a[p * 3 + 1] / 257);
      sum += v;
      sumSq += v * v;
    }
    const sd = Math.sqrt(sumSq / n - (sum / n) ** 2);
    expect(Math.abs(sd / 0.01 - 1)).toBeLessThan(0.05);
    expect(Math.abs(sum / n - linear[1])).toBeLessThan(0.0005);
  });
  it('checkPhotoFormation() fills defaults and names bad values', () => {
    expect(checkPhotoFormation({})).toEqual({ exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] });
    expect(checkPhotoFormation({ flare: 0.1 }).flare).toEqual([0.1, 0.1, 0.1]);
    expect(() => checkPhotoFormation({ exposure: -1 })).toThrow('exposure must be a finite number > 0, received -1');
    expect(() => checkPhotoFormation({ whiteBalance: [1, 0, 1] })).toThrow(/whiteBalance must be three finite gains > 0/);
  });
  it('predictEncodedPixel() is encode(clamp(exposure·W(gains)·rgb + flare))', () => {
    const out = new Float64Array(3);
    const p = checkPhotoFormation({ exposure: 2, whiteBalance: [0.5, 0.5, 0.5], flare: [0, 0.1, 0] });
    predictEncodedPixel([0.2, 0.3, 0.8], p, encodeSrgb, out);
    expect(out[0]).toBeCloseTo(encodeSrgb(0.2), 12);
    expect(out[1]).toBeCloseTo(encodeSrgb(0.4), 12);
    expect(out[2]).toBeCloseTo(encodeSrgb(0.8), 12);
    predictEncodedPixel([0.2, 0.3, 0.8], checkPhotoFormation({ exposure: 2, whiteBalance: [1, 1, 0.5] }), encodeLinear, out, 0, 'linear');
    expect(Array.from(out)).toEqual([0.4, 0.6, 0.8]);
  });
});

describe('createSrgbEncoder() (tabulated IEC 61966-2-1 curve)', () => {
  it('agrees with the exact curve within 1e-6 everywhere (largest at the 0.0031308 junction), including the linear toe', () => {
    const fast = createSrgbEncoder();
    let worst = 0;
    for (let i = 0; i <= 200000; i++) {
      const v = i / 200000;
      worst = Math.max(worst, Math.abs(fast(v) - encodeSrgb(v)));
    }
    for (let i = 0; i <= 10000; i++) worst = Math.max(worst, Math.abs(fast(i * 1e-6) - encodeSrgb(i * 1e-6)));
    expect(worst).toBeLessThan(1e-6);
  });
  it('clamps below 0 and above 1', () => {
    const fast = createSrgbEncoder();
    expect(fast(-0.3)).toBe(0);
    expect(fast(4)).toBeCloseTo(1, 12);
    expect(linearToSrgb8(1)).toBe(255);
  });
});

describe('createNormal() (Mulberry32 + Box–Muller)', () => {
  it('has mean 0 and standard deviation 1 within sampling error over 100 000 draws', () => {
    const normal = createNormal(42);
    let sum = 0;
    let sumSq = 0;
    const n = 100000;
    for (let i = 0; i < n; i++) {
      const x = normal();
      sum += x;
      sumSq += x * x;
    }
    expect(Math.abs(sum / n)).toBeLessThan(0.015); // 4.7 standard errors
    expect(Math.abs(Math.sqrt(sumSq / n) - 1)).toBeLessThan(0.01);
  });
});

describe('encodedCodeTable() (integer codes of the IEC 61966-2-1 curve for hot loops)', () => {
  const lookup = (table: ReturnType<typeof encodedCodeTable>, v: number) => table.codes[(Math.min(1, Math.max(0, v)) * table.maxIndex + 0.5) | 0];
  it('8-bit sRGB: within one code of exact rounding everywhere, equal for ≥ 99.5 % of 100 001 values', () => {
    const table = encodedCodeTable('srgb', 8);
    let equal = 0;
    for (let i = 0; i <= 100000; i++) {
      const v = i / 100000;
      const diff = Math.abs(lookup(table, v) - linearToSrgb8(v));
      expect(diff).toBeLessThanOrEqual(1);
      if (diff === 0) equal++;
    }
    expect(equal / 100001).toBeGreaterThan(0.995);
  });
  it('16-bit sRGB: within one code of exact rounding', () => {
    const table = encodedCodeTable('srgb', 16);
    for (let i = 0; i <= 100000; i++) expect(Math.abs(lookup(table, i / 100000) - linearToSrgb16(i / 100000))).toBeLessThanOrEqual(1);
  });
  it('linear output is the identity scaled to the code range', () => {
    expect(lookup(encodedCodeTable('linear', 8), 0.5)).toBe(128);
    expect(lookup(encodedCodeTable('linear', 16), 0.25)).toBe(16384);
  });
});

describe('normalQuantileTable() (equiprobable quantiles of the standard normal)', () => {
  const table = normalQuantileTable();
  it('is symmetric, with mean 0 and standard deviation within 1e-4 of 1', () => {
    let sum = 0;
    let sumSq = 0;
    for (const z of table) {
      sum += z;
      sumSq += z * z;
    }
    expect(Math.abs(sum / table.length)).toBeLessThan(1e-6);
    expect(Math.abs(Math.sqrt(sumSq / table.length) - 1)).toBeLessThan(1e-4);
    expect(table[0]).toBeCloseTo(-table[table.length - 1], 5);
  });
  it('has the textbook quantiles: Φ⁻¹(0.975) = 1.959964 and Φ⁻¹(0.841345) = 1.0 (standard normal tables, e.g. Abramowitz & Stegun 1964, Table 26.1/26.5)', () => {
    // Entry i is the quantile at p = (i + 0.5)/65536; interpolate to the wanted p.
    const at = (p: number) => {
      const x = p * 65536 - 0.5;
      const i = Math.floor(x);
      return table[i] + (x - i) * (table[i + 1] - table[i]);
    };
    expect(at(0.975)).toBeCloseTo(1.959964, 4);
    expect(at(0.841345)).toBeCloseTo(1.0, 4);
  });
});
