/**
 * How evenly the film was lit, measured after the map: for film pixels with an estimate, the
 * ratio of the photo's luminance to the model's luminance at the mapped thickness (both in linear
 * light, Rec. 709 / sRGB luminance weights, IEC 61966-2-1) is the light the photo received there
 * relative to the fitted exposure. Its logarithm is fitted by least squares with a quadratic in
 * position plus a radial fourth-order term (a smooth fall-off across the photo and lens
 * vignetting are both smooth; the cos⁴ law of illumination, common practice, falls off as
 * cos⁴θ = (1 + r²·tan²θ₁)⁻², whose logarithm has an r⁴ term a quadratic misses: without it a
 * 25 % vignetting leaves the corners a few per cent off), with one pass of outlier trimming, and the surface's range over the film is reported
 * as relative gains (1 = the median). The mapper fits one exposure for the whole photo, so a wide
 * range means the model does not explain the photo: pixels in the dim or bright parts can be
 * read at a wrong thickness. With a camera response (picture style) both colours are taken back
 * through its inverse before decoding (../colour/toneResponse.ts). It is a check, not a correction; a pixel pulled to a wrong thickness
 * partly hides its own shortfall, so the range found is a lower bound of the real one.
 */
import { choleskySolve } from '../fit/normalEquations.js';
import { createSrgbDecoder } from '../colour/srgbEncoderTable.js';
import { PixelStatus } from './types.js';
import { selectKth } from './statistics.js';
import { modelColourAt, type PhotoAndModel } from './fitQuality.js';
import { type CameraResponse, createResponseInverse } from '../colour/toneResponse.js';
import { valueAt } from './photoPixels.js';

/** sRGB decoding from the shared table (../colour/srgbEncoderTable.ts: exact at 8- and 16-bit codes, within 1e-7 between). */
const decodeFast = createSrgbDecoder();

export interface LightEvenness {
  /** Lowest and highest relative gain of the fitted surface over the film (median 1). */
  readonly gainMin: number;
  readonly gainMax: number;
  readonly pixelsUsed: number;
  /**
   * The fitted surface: log(relative gain) = Σ c_k·b_k(u, v) − c_median with the basis
   * 1, u, v, u², uv, v², r⁴ = (u² + v²)² of u = (x + ½ − width/2)/s, v = (y + ½ − height/2)/s, s = max(width, height)/2
   * (pixel centres; the constant term already holds the median's offset).
   */
  readonly logGainCoefficients: readonly number[];
}

/** Relative gain of a fitted surface at pixel (x, y) of a width × height photo (a missing 7th coefficient is 0). */
export function relativeGainAt(coefficients: readonly number[], width: number, height: number, x: number, y: number): number {
  const half = Math.max(width, height) / 2;
  const u = (x + 0.5 - width / 2) / half;
  const v = (y + 0.5 - height / 2) / half;
  const r2 = u * u + v * v;
  return Math.exp(coefficients[0] + coefficients[1] * u + coefficients[2] * v + coefficients[3] * u * u + coefficients[4] * u * v + coefficients[5] * v * v + (coefficients[6] ?? 0) * r2 * r2);
}

export interface LightEvennessInput extends PhotoAndModel {
  readonly width: number;
  readonly height: number;
  /** The camera's response the model's colours carry (absent = identity). */
  readonly response?: CameraResponse | null;
}

/** Above this max/min gain ratio over the film, the map warns (a judgement: 15 % shifts orders' colours visibly). */
export const UNEVEN_LIGHT_RATIO = 1.15;
const MAX_SAMPLES = 40_000;
const MIN_SAMPLES = 200;
/** Model luminance below which the ratio is too noisy to use (dark film, black film). */
const MIN_MODEL_LUMINANCE = 0.04;
const TERMS = 7;

function linearOf(value: number, encoded: boolean): number {
  return encoded ? decodeFast(value < 0 ? 0 : value > 1 ? 1 : value) : value;
}

function luminance(r: number, g: number, b: number, encoded: boolean): number {
  return 0.2126 * linearOf(r, encoded) + 0.7152 * linearOf(g, encoded) + 0.0722 * linearOf(b, encoded);
}

function basis(u: number, v: number, out: Float64Array): void {
  out[0] = 1;
  out[1] = u;
  out[2] = v;
  out[3] = u * u;
  out[4] = u * v;
  out[5] = v * v;
  out[6] = (u * u + v * v) ** 2;
}

export function lightEvennessOf(input: LightEvennessInput): LightEvenness | null {
  const samples = collectSamples(input);
  if (samples === null) return null;
  const { us, vs, logs, n } = samples;
  const keep = new Uint8Array(n).fill(1);
  const coefficients = new Float64Array(TERMS);
  const a = new Float64Array(TERMS * TERMS);
  const rhs = new Float64Array(TERMS);
  const surface = new Float64Array(n);
  for (let pass = 0; pass < 2; pass++) {
    normalEquations(us, vs, logs, keep, n, a, rhs);
    // A faint ridge keeps the system solvable when the film covers a thin strip only.
    for (let p = 1; p < TERMS; p++) a[p * TERMS + p] += 1e-6 * (a[0] + 1);
    if (!choleskySolve(a, rhs, TERMS, coefficients)) return null;
    if (pass === 1) break;
    // Trim pixels far from the surface (wrong orders, mixtures), by 3 scaled MADs (common practice).
    surfaceAt(coefficients, us, vs, n, surface);
    const residuals = new Float64Array(n);
    for (let s = 0; s < n; s++) residuals[s] = Math.abs(logs[s] - surface[s]);
    // Order statistics by selection (O(n)): a typed array's sort is the slowest step otherwise.
    const limit = 3 * 1.4826 * selectKth(Float64Array.from(residuals), Math.floor(n / 2)) + 1e-3;
    for (let s = 0; s < n; s++) keep[s] = residuals[s] <= limit ? 1 : 0;
  }
  surfaceAt(coefficients, us, vs, n, surface);
  let used = 0;
  for (let s = 0; s < n; s++) used += keep[s];
  const values = Float64Array.from(surface);
  const median = selectKth(values, Math.floor(n / 2));
  // The 1st and 99th percentiles over the film: the surface's extremes at a few stray pixels
  // far out in a corner would overstate the range.
  const low = selectKth(values, Math.floor(0.01 * (n - 1)));
  const high = selectKth(values, Math.ceil(0.99 * (n - 1)));
  const logGainCoefficients = Array.from(coefficients);
  logGainCoefficients[0] -= median;
  return { gainMin: Math.exp(low - median), gainMax: Math.exp(high - median), pixelsUsed: used, logGainCoefficients };
}

// Each loop is its own small function: one long function with several loops, run once per photo,
// is compiled loop by loop and thrown back to the interpreter at the next (measured: 5× slower).

/**
 * Position and log luminance ratio of every k-th film pixel, k = ⌊film pixels / MAX_SAMPLES⌋ (at
 * least 1: every film pixel up to 2 × MAX_SAMPLES of them, then between MAX_SAMPLES and
 * 2 × MAX_SAMPLES samples); null when too few.
 */
function collectSamples(input: LightEvennessInput): { us: Float64Array; vs: Float64Array; logs: Float64Array; n: number } | null {
  const { rgb, status, thicknessNm, width, height } = input;
  let ok = 0;
  for (let i = 0; i < status.length; i++) if (status[i] === PixelStatus.ok) ok++;
  if (ok < MIN_SAMPLES) return null;
  const stride = Math.max(1, Math.floor(ok / MAX_SAMPLES));
  const us = new Float64Array(Math.ceil(ok / stride));
  const vs = new Float64Array(us.length);
  const logs = new Float64Array(us.length);
  const model = new Float64Array(3);
  const plain = new Float64Array(6);
  const inverseResponse = createResponseInverse(input.encoded ? input.response : null);
  const half = Math.max(width, height) / 2;
  // Every stride-th film pixel from the first (a countdown, not a division per pixel).
  let skip = 0;
  let n = 0;
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    if (skip > 0) {
      skip--;
      continue;
    }
    skip = stride - 1;
    const r = valueAt(rgb, i * 3);
    const g = valueAt(rgb, i * 3 + 1);
    const b = valueAt(rgb, i * 3 + 2);
    if (r > 0.97 || g > 0.97 || b > 0.97) continue;
    modelColourAt(input, thicknessNm[i], model);
    inverseResponse.invert(model[0], model[1], model[2], plain, 0);
    inverseResponse.invert(r, g, b, plain, 3);
    const modelY = luminance(plain[0], plain[1], plain[2], input.encoded);
    const photoY = luminance(plain[3], plain[4], plain[5], input.encoded);
    if (modelY < MIN_MODEL_LUMINANCE || photoY <= 0) continue;
    const x = i % width;
    const y = (i - x) / width;
    us[n] = (x + 0.5 - width / 2) / half;
    vs[n] = (y + 0.5 - height / 2) / half;
    logs[n] = Math.log(photoY / modelY);
    n++;
  }
  return n < MIN_SAMPLES ? null : { us, vs, logs, n };
}

/** The least-squares normal equations of the kept samples (a: TERMS × TERMS, symmetric). */
function normalEquations(us: Float64Array, vs: Float64Array, logs: Float64Array, keep: Uint8Array, n: number, a: Float64Array, rhs: Float64Array): void {
  a.fill(0);
  rhs.fill(0);
  const row = new Float64Array(TERMS);
  for (let s = 0; s < n; s++) {
    if (!keep[s]) continue;
    basis(us[s], vs[s], row);
    // The upper triangle only (mirrored below).
    for (let p = 0; p < TERMS; p++) {
      const rp = row[p];
      rhs[p] += rp * logs[s];
      for (let q = p; q < TERMS; q++) a[p * TERMS + q] += rp * row[q];
    }
  }
  for (let p = 1; p < TERMS; p++) for (let q = 0; q < p; q++) a[p * TERMS + q] = a[q * TERMS + p];
}

/** The fitted log-gain surface at each sample. */
function surfaceAt(coefficients: Float64Array, us: Float64Array, vs: Float64Array, n: number, out: Float64Array): void {
  const row = new Float64Array(TERMS);
  for (let s = 0; s < n; s++) {
    basis(us[s], vs[s], row);
    let fit = 0;
    for (let p = 0; p < TERMS; p++) fit += coefficients[p] * row[p];
    out[s] = fit;
  }
}

export function unevenLightWarning(evenness: LightEvenness): string {
  const pct = (v: number): string => `${Math.round(Math.abs(v - 1) * 100)} %`;
  return `the light on the film is uneven: the photo is up to ${pct(evenness.gainMin)} darker and ${pct(evenness.gainMax)} brighter than the fitted exposure in places (a lamp's fall-off or lens vignetting?). One exposure is fitted for the whole photo, so thicknesses in the dim and bright parts can be wrong: light the film evenly, or map parts separately with --region`;
}
