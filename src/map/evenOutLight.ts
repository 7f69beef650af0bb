/**
 * A smooth exposure field divided out of a photo in linear light (./lightField.ts fits the field).
 * Each encoded value v becomes encode((decode(v) − f)·k + f), with f the channel's flare (added
 * after the exposure, so kept) and k = exp(−log gain) at the pixel. With a camera response
 * (picture style, ../colour/toneResponse.ts) the pixel is first taken back through its inverse
 * (the saturation about luma undone, then T⁻¹) and the response applied again after, so the gain
 * is divided out where it acted.
 *
 * The whole chain runs in one pass per row over tables (sRGB decode and encode from
 * ../colour/srgbEncoderTable.ts, T and T⁻¹ from ../colour/toneResponse.ts, all read with linear
 * interpolation), with no call per value: a 12-MP photo is evened in a fraction of a second.
 */
import { SRGB_TABLE_SIZE, srgbDecodeTable, srgbEncodeTable } from '../colour/srgbEncoderTable.js';
import { evenRowsThreaded } from './pixelThreads.js';
import { codePixels, floatPixels, type PhotoPixels, sharedPixels } from './photoPixels.js';
import { codesToFloats } from '../io/codeLevels.js';
import type { EvenLightInput } from './evenLightInput.js';
import { type CameraResponse, INVERSE_SIZE, isIdentityResponse, LUMA_BT601, responseTables, TONE_TABLE_SIZE, toneAt } from '../colour/toneResponse.js';

const DECODE_SCALE = 65535;
const LR = LUMA_BT601[0];
const LG = LUMA_BT601[1];
const LB = LUMA_BT601[2];

/** Photos with fewer pixels are evened on one thread (starting helpers would cost more than it saves). */
const MIN_THREADED_PIXELS = 1_000_000;

/**
 * The photo with the field's gain divided out (a copy in shared memory, for the mapper's threads):
 * on 8-bit codes with `eightBit` (./photoPixels.ts), else as floats. With `threads` > 1, a large
 * photo's rows are shared with the pixel pass's helper threads (./pixelThreads.ts); every row is
 * computed alone, so the result is the same whatever the count.
 */
export function evenOutLight(
  rgb: PhotoPixels,
  width: number,
  height: number,
  logGainCoefficients: readonly number[],
  flare: readonly number[],
  clamp: readonly [number, number] | null = null,
  response: CameraResponse | null = null,
  eightBit = false,
  threads = 1,
): PhotoPixels {
  const out = eightBit ? codePixels(new Uint8Array(new SharedArrayBuffer(rgb.length))) : floatPixels(new Float32Array(new SharedArrayBuffer(rgb.length * 4)));
  if (threads > 1 && width * height >= MIN_THREADED_PIXELS) {
    const input: EvenLightInput = { rgb: sharedPixels(rgb), width, height, logGainCoefficients: [...logGainCoefficients], flare: [...flare], clamp, response, eightBit };
    evenRowsThreaded(input, out, threads, (y0, y1) => evenOutLightRows(input, out, y0, y1));
  } else {
    evenOutLightRows({ rgb, width, height, logGainCoefficients, flare, clamp, response, eightBit }, out, 0, height);
  }
  return out;
}

/**
 * Rows [y0, y1) of the evened photo into `out`; returns the rows done. A row of codes (8-bit or
 * 16-bit) is read through a float copy of the row, and a row put on 8-bit codes (`eightBit`: only
 * an 8-bit photo's) is written to one first: the row loops below then read and write floats only.
 */
export function evenOutLightRows(input: EvenLightInput, out: PhotoPixels, y0: number, y1: number): number {
  const { rgb, width, height, flare, clamp, response } = input;
  const c = input.logGainCoefficients;
  const half = Math.max(width, height) / 2;
  // log gain = a(u) + b(v) + c4·u·v + c6·(u² + v²)²: the u and v parts once per column and row.
  const us = new Float64Array(width);
  const colTerm = new Float64Array(width);
  for (let x = 0; x < width; x++) {
    const u = (x + 0.5 - width / 2) / half;
    us[x] = u;
    colTerm[x] = c[1] * u + c[3] * u * u;
  }
  const r4 = c[6] ?? 0;
  const inverse = new Float64Array(width);
  const stride = gainStride(width, height);
  const lo = clamp ? clamp[0] : -Infinity;
  const hi = clamp ? clamp[1] : Infinity;
  const decode = srgbDecodeTable();
  const encode = srgbEncodeTable();
  const styled = response !== null && !isIdentityResponse(response);
  const tables = styled ? responseTables(response) : null;
  const saturation = styled ? response.saturation : 1;
  const contrast = styled ? response.contrast : 0;
  const gamma = styled ? response.gamma : 1;
  const f0 = flare[0];
  const f1 = flare[1];
  const f2 = flare[2];
  const quantise = input.eightBit ? 255 : 0;
  const triple = new Float64Array(3);
  const linearTriple = new Float64Array(3);
  const fromRow = rgb.codes !== null ? new Float32Array(width * 3) : null;
  const toRow = out.codes !== null ? new Float32Array(width * 3) : null;
  for (let y = y0; y < y1; y++) {
    const v = (y + 0.5 - height / 2) / half;
    inverseGainRow(us, colTerm, c[0] + c[2] * v + c[5] * v * v, c[4] * v, v, r4, lo, hi, stride, inverse);
    const offset = y * width * 3;
    if (fromRow !== null) codesToFloats(rgb.codes!, offset, fromRow);
    const from = fromRow ?? rgb.values;
    const to = toRow ?? out.values;
    const fromAt = fromRow !== null ? 0 : offset;
    const toAt = toRow !== null ? 0 : offset;
    if (tables) styledRow(from, fromAt, to, toAt, width, inverse, f0, f1, f2, decode, encode, tables.inverseTone, tables.tone, 1 / saturation, saturation, contrast, gamma, quantise, triple, linearTriple);
    else plainRow(from, fromAt, to, toAt, width, inverse, f0, f1, f2, decode, encode, quantise);
    if (toRow !== null) floatsToCodes(toRow, out.codes as Uint8Array, offset);
  }
  return y1 - y0;
}

/** One row of values already on 8-bit levels (k/255) back to their codes from `offset`. */
function floatsToCodes(row: Float32Array, codes: Uint8Array, offset: number): void {
  for (let k = 0; k < row.length; k++) codes[offset + k] = Math.round(row[k] * 255);
}

/**
 * exp(−log gain) along one row, the log gain held within [lo, hi]: exact at every `stride`-th
 * column and the last, linear between (see gainStride).
 */
function inverseGainRow(us: Float64Array, colTerm: Float64Array, rowTerm: number, uvTerm: number, v: number, r4: number, lo: number, hi: number, stride: number, out: Float64Array): void {
  const width = us.length;
  const at = (x: number): number => {
    const u = us[x];
    const r2 = u * u + v * v;
    let logGain = rowTerm + colTerm[x] + uvTerm * u + r4 * r2 * r2;
    logGain = logGain < lo ? lo : logGain > hi ? hi : logGain;
    return Math.exp(-logGain);
  };
  let x0 = 0;
  let k0 = at(0);
  out[0] = k0;
  while (x0 < width - 1) {
    const x1 = Math.min(x0 + stride, width - 1);
    const k1 = at(x1);
    const step = (k1 - k0) / (x1 - x0);
    for (let x = x0 + 1; x < x1; x++) out[x] = k0 + (x - x0) * step;
    out[x1] = k1;
    x0 = x1;
    k0 = k1;
  }
}

/**
 * Columns between exact gains (inverseGainRow): 1/256 of the photo's long side. The field is a
 * quadratic plus r⁴ in coordinates scaled to the photo, so its curvature per pixel falls with the
 * square of the size; over 1/256 of the side, linear interpolation is off by under 2e-5 of the
 * gain for the steepest field the fit allows (35 % fall-off with strong vignetting; tested).
 */
function gainStride(width: number, height: number): number {
  return Math.max(1, Math.floor(Math.max(width, height) / 256));
}

/**
 * A pixel of the same colour as its left neighbour (two in three, on a film's smooth colours)
 * takes the neighbour's evened colour while the gain is within this share of the one that colour
 * was evened at: the evened value then moves by at most 0.42 × 4e-4 of itself (sRGB encoding), 0.04 of an 8-bit code.
 */
const REUSE_GAIN = 4e-4;

/*
 * The row loops below read their tables inline (index, fraction, interpolation written out): a
 * helper per read is not reliably inlined in loops this size, and a call per value costs more
 * than the read itself. Each table is read with linear interpolation after clamping to 0..1.
 */

/** One row without a response: encode((decode(v) − f)·k + f), clamped (and put on 8-bit codes). */
function plainRow(
  from: Float32Array,
  fromAt: number,
  to: Float32Array,
  toAt: number,
  width: number,
  inverse: Float64Array,
  f0: number,
  f1: number,
  f2: number,
  decode: Float64Array,
  encode: Float64Array,
  levels: number,
): void {
  let doneAt = NaN;
  for (let x = 0, i = fromAt, o = toAt; x < width; x++, i += 3, o += 3) {
    const k = inverse[x];
    if (x > 0 && from[i] === from[i - 3] && from[i + 1] === from[i - 2] && from[i + 2] === from[i - 1] && Math.abs(k - doneAt) <= REUSE_GAIN * doneAt) {
      to[o] = to[o - 3];
      to[o + 1] = to[o - 2];
      to[o + 2] = to[o - 1];
      continue;
    }
    doneAt = k;
    for (let c = 0; c < 3; c++) {
      const f = c === 0 ? f0 : c === 1 ? f1 : f2;
      const e = from[i + c];
      let t = e > 0 ? (e < 1 ? e : 1) * DECODE_SCALE : 0;
      let j = t | 0;
      const linear = (decode[j] + (t - j) * (decode[j + 1] - decode[j]) - f) * k + f;
      t = linear > 0 ? (linear < 1 ? linear : 1) * SRGB_TABLE_SIZE : 0;
      j = t | 0;
      const out = encode[j] + (t - j) * (encode[j + 1] - encode[j]);
      to[o + c] = levels === 0 ? out : Math.round(out * levels) * (1 / 255);
    }
  }
}

/**
 * One row with a response: the saturation about luma undone and T⁻¹ (the encoded values before
 * the style), the gain divided out in linear light, then T and the saturation again.
 */
function styledRow(
  from: Float32Array,
  fromAt: number,
  to: Float32Array,
  toAt: number,
  width: number,
  inverse: Float64Array,
  f0: number,
  f1: number,
  f2: number,
  decode: Float64Array,
  encode: Float64Array,
  inverseTone: Float64Array,
  tone: Float64Array,
  inverseSaturation: number,
  saturation: number,
  contrast: number,
  gamma: number,
  levels: number,
  styled: Float64Array,
  linear: Float64Array,
): void {
  let doneAt = NaN;
  for (let x = 0, i = fromAt, o = toAt; x < width; x++, i += 3, o += 3) {
    const k = inverse[x];
    const repeated = x > 0 && from[i] === from[i - 3] && from[i + 1] === from[i - 2] && from[i + 2] === from[i - 1];
    if (repeated && Math.abs(k - doneAt) <= REUSE_GAIN * doneAt) {
      to[o] = to[o - 3];
      to[o + 1] = to[o - 2];
      to[o + 2] = to[o - 1];
      continue;
    }
    doneAt = k;
    // The linear values before the gain depend on the colour alone: a repeated colour keeps them.
    if (!repeated) {
      const luma = LR * from[i] + LG * from[i + 1] + LB * from[i + 2];
      for (let c = 0; c < 3; c++) {
        const s = luma + inverseSaturation * (from[i + c] - luma);
        let t = s > 0 ? (s < 1 ? s : 1) * INVERSE_SIZE : 0;
        let j = t | 0;
        const e = inverseTone[j] + (t - j) * (inverseTone[j + 1] - inverseTone[j]);
        t = e > 0 ? (e < 1 ? e : 1) * DECODE_SCALE : 0;
        j = t | 0;
        linear[c] = decode[j] + (t - j) * (decode[j + 1] - decode[j]);
      }
    }
    for (let c = 0; c < 3; c++) {
      const f = c === 0 ? f0 : c === 1 ? f1 : f2;
      const divided = (linear[c] - f) * k + f;
      let t = divided > 0 ? (divided < 1 ? divided : 1) * SRGB_TABLE_SIZE : 0;
      let j = t | 0;
      const encoded = encode[j] + (t - j) * (encode[j + 1] - encode[j]);
      t = encoded * TONE_TABLE_SIZE;
      j = t | 0;
      // The tone table's first cell holds the steepest part of a power below 1: computed.
      styled[c] = j === 0 ? toneAt(encoded, contrast, gamma) : tone[j] + (t - j) * (tone[j + 1] - tone[j]);
    }
    const r = styled[0];
    const g = styled[1];
    const b = styled[2];
    const luma2 = LR * r + LG * g + LB * b;
    for (let c = 0; c < 3; c++) {
      const v = luma2 + saturation * (styled[c] - luma2);
      const out = v < 0 ? 0 : v > 1 ? 1 : v;
      to[o + c] = levels === 0 ? out : Math.round(out * levels) * (1 / 255);
    }
  }
}
