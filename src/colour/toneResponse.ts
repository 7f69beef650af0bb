/**
 * The camera's response: what a camera's "picture style" does to the sRGB-encoded values of a
 * JPEG after the sRGB encode, modelled as a monotone tone curve T on each encoded channel followed
 * by a saturation factor s about luma:
 *
 *   t_c = T(e_c)                                   (e_c the sRGB-encoded value, 0..1)
 *   o_c = clamp01( Y' + s · (t_c − Y') ),   Y' = 0.299·t_R + 0.587·t_G + 0.114·t_B
 *
 * Luma weights are those of ITU-R BT.601, the YCbCr of JPEG/JFIF (ITU-T T.871), where cameras
 * scale chroma (common practice). The weights sum to 1, so the scaling leaves Y' unchanged and is
 * undone by Y' + (o_c − Y')/s (for values the clamp left alone).
 *
 * The tone curve ("power-rational-s" family), two parameters:
 *
 *   u = e^γ,   T(e) = (1 − k)·u + k·S(u),   S(u) = u² / (u² + (1 − u)²)  (a rational S-curve)
 *
 * - `contrast` k: k > 0 an S-curve (darker shadows, brighter highlights, steeper mid-tones), k < 0
 *   the opposite; k = 0 none. S' = 2u(1 − u)/(u² + (1 − u)²)² lies in [0, 2] (2 at u = ½), so
 *   dT/du = (1 − k) + k·S'(u) ≥ min(1 − k, 1 + k) > 0 for −1 < k < 1, and du/de = γe^(γ−1) > 0:
 *   T is strictly increasing for every allowed value (CONTRAST_RANGE keeps k inside (−1, 1) with a
 *   margin); T(0) = 0 and T(1) = 1 for all k, γ. The rational S was chosen over the cubic
 *   smoothstep because its mid-tone slope (2 instead of 1.5) follows the steep S-curves of
 *   everyday picture styles more closely (see DEVELOPERS.md).
 * - `gamma` γ > 0: moves the mid-tones (γ < 1 brighter, γ > 1 darker); γ = 1 none.
 * Neutral values: k = 0, γ = 1, s = 1 (the identity). The contrast acts symmetrically about the
 * middle, the gamma asymmetrically, so the two are told apart by photos with dark and bright colours.
 *
 * Pure and allocation-free per value: the inverse (for the light field) reads a tabulated inverse
 * of T built once per response.
 */

export interface CameraResponse {
  /** k of the tone curve (0 = none). */
  readonly contrast: number;
  /** γ of the tone curve (1 = none). */
  readonly gamma: number;
  /** Chroma factor about BT.601 luma (1 = none). */
  readonly saturation: number;
}

export const IDENTITY_RESPONSE: CameraResponse = { contrast: 0, gamma: 1, saturation: 1 };

/** Allowed parameter ranges (the fit's bounds): wide enough for every everyday picture style. */
export const CONTRAST_RANGE: readonly [number, number] = [-0.8, 0.9];
export const GAMMA_RANGE: readonly [number, number] = [0.5, 2];
export const SATURATION_RANGE: readonly [number, number] = [0.5, 2];

/** The name of the tone-curve family in the JSON record. */
export const TONE_FAMILY = 'power-rational-s';

/** BT.601 luma weights (ITU-R BT.601; JPEG/JFIF YCbCr, ITU-T T.871). */
export const LUMA_BT601: readonly [number, number, number] = [0.299, 0.587, 0.114];

export function isIdentityResponse(response: CameraResponse | null | undefined): boolean {
  return !response || (response.contrast === 0 && response.gamma === 1 && response.saturation === 1);
}

/** Throws a RangeError naming the parameter when a response is outside the allowed ranges. */
export function checkResponse(response: CameraResponse): CameraResponse {
  const inside = (name: string, value: number, [lo, hi]: readonly [number, number]): void => {
    if (typeof value !== 'number' || !Number.isFinite(value) || value < lo || value > hi) {
      throw new RangeError(`response ${name} must be a number in ${lo}…${hi}, received ${String(value)}`);
    }
  };
  inside('contrast', response.contrast, CONTRAST_RANGE);
  inside('gamma', response.gamma, GAMMA_RANGE);
  inside('saturation', response.saturation, SATURATION_RANGE);
  return response;
}

/** T(e) for one encoded value (clamped to 0..1 first). */
export function toneAt(encoded: number, contrast: number, gamma: number): number {
  const e = encoded <= 0 ? 0 : encoded >= 1 ? 1 : encoded;
  const u = gamma === 1 ? e : Math.pow(e, gamma);
  const v = 1 - u;
  return (1 - contrast) * u + (contrast * u * u) / (u * u + v * v);
}

/**
 * Applies the response in place to `count` RGB triples of encoded values (row-major, 0..1):
 * tone curve per channel, saturation about BT.601 luma, clamp to 0..1. Does nothing for the identity.
 */
export function applyResponse(values: Float32Array | Float64Array, count: number, response: CameraResponse | null | undefined): void {
  if (!response || isIdentityResponse(response)) return;
  const { contrast, gamma, saturation } = response;
  // Large tables (the mapper's predicted table, evaluated many times in the fit) read T from a
  // table of TONE_TABLE_SIZE + 1 samples with linear interpolation instead of a power per value
  // (error below 1e-4, 0.03 of an 8-bit code, above e = 0.01 and 0.01 below; checked in the
  // tests); small ones compute it exactly.
  const tabulated = count * 3 > 2 * TONE_TABLE_SIZE;
  if (tabulated) fillToneTable(contrast, gamma);
  for (let i = 0; i < count; i++) {
    const o = i * 3;
    const r = tabulated ? toneFromTable(values[o]) : toneAt(values[o], contrast, gamma);
    const g = tabulated ? toneFromTable(values[o + 1]) : toneAt(values[o + 1], contrast, gamma);
    const b = tabulated ? toneFromTable(values[o + 2]) : toneAt(values[o + 2], contrast, gamma);
    const y = LUMA_BT601[0] * r + LUMA_BT601[1] * g + LUMA_BT601[2] * b;
    values[o] = clampUnit(y + saturation * (r - y));
    values[o + 1] = clampUnit(y + saturation * (g - y));
    values[o + 2] = clampUnit(y + saturation * (b - y));
  }
}

export const TONE_TABLE_SIZE = 1024;
const toneTable = new Float64Array(TONE_TABLE_SIZE + 2);
/** ln(j / TONE_TABLE_SIZE), so that filling the table costs an exp per sample instead of a power. */
const LOG_GRID = Float64Array.from({ length: TONE_TABLE_SIZE + 1 }, (_, j) => Math.log(j / TONE_TABLE_SIZE));

let tableContrast = 0;
let tableGamma = 1;

let tableFilled = false;

function fillToneTable(contrast: number, gamma: number): void {
  // The same curve again (a photo's rows, one after another): the table holds it already.
  if (tableFilled && contrast === tableContrast && gamma === tableGamma) return;
  tableFilled = true;
  tableContrast = contrast;
  tableGamma = gamma;
  toneTable[0] = 0;
  for (let j = 1; j <= TONE_TABLE_SIZE; j++) {
    const u = Math.exp(gamma * LOG_GRID[j]);
    const v = 1 - u;
    toneTable[j] = (1 - contrast) * u + (contrast * u * u) / (u * u + v * v);
  }
  toneTable[TONE_TABLE_SIZE + 1] = toneTable[TONE_TABLE_SIZE];
}

function toneFromTable(encoded: number): number {
  const v = encoded > 0 ? (encoded < 1 ? encoded : 1) * TONE_TABLE_SIZE : 0;
  const i = v | 0;
  // The first cell holds the steepest part of a power below 1: computed exactly.
  if (i === 0) return toneAt(encoded, tableContrast, tableGamma);
  const f = v - i;
  return toneTable[i] + f * (toneTable[i + 1] - toneTable[i]);
}

/**
 * The tables of a response for fused hot loops (../map/evenOutLight.ts): T on TONE_TABLE_SIZE + 1
 * points (a copy of applyResponse's table; read the first cell with toneAt, as it does) and T⁻¹
 * on INVERSE_SIZE + 1 points (createResponseInverse's), each with a guard at the end.
 */
export function responseTables(response: CameraResponse): { readonly tone: Float64Array; readonly inverseTone: Float64Array } {
  fillToneTable(response.contrast, response.gamma);
  return { tone: toneTable.slice(), inverseTone: inverseToneTable(response.contrast, response.gamma) };
}

/** T of each value in place, read from the table applyResponse uses for large tables (for its accuracy test). */
export function applyTabulatedTone(values: Float64Array, contrast: number, gamma: number): void {
  fillToneTable(contrast, gamma);
  for (let i = 0; i < values.length; i++) values[i] = toneFromTable(values[i]);
}

export const INVERSE_SIZE = 4096;

/**
 * The inverse of a response, for undoing it on pixels: `invert(r, g, b, out, offset)` writes the
 * encoded values before the style (undoes the saturation about luma, then T by a tabulated
 * inverse with linear interpolation; the table's error is below 1e-4 for the allowed ranges, checked in the tests).
 * Clipped values stay where the clamp put them (their true value is unknown).
 */
export interface ResponseInverse {
  readonly identity: boolean;
  invert(r: number, g: number, b: number, out: Float32Array | Float64Array, offset: number): void;
  /** T⁻¹ of one value. */
  invertTone(value: number): number;
}

export function createResponseInverse(response: CameraResponse | null | undefined): ResponseInverse {
  if (!response || isIdentityResponse(response)) return IDENTITY_INVERSE;
  return new StyledInverse(inverseToneTable(response.contrast, response.gamma), 1 / response.saturation);
}

/**
 * The inverses as classes (their code compiled once per process; closures made per photo were
 * compiled again for every photo of a series).
 */
class IdentityInverse implements ResponseInverse {
  readonly identity = true;
  invert(r: number, g: number, b: number, out: Float32Array | Float64Array, offset: number): void {
    out[offset] = r;
    out[offset + 1] = g;
    out[offset + 2] = b;
  }
  invertTone(value: number): number {
    return value;
  }
}

const IDENTITY_INVERSE = new IdentityInverse();

class StyledInverse implements ResponseInverse {
  readonly identity = false;
  constructor(
    private readonly table: Float64Array,
    private readonly inverseSaturation: number,
  ) {}
  invertTone(value: number): number {
    const table = this.table;
    const v = value > 0 ? (value < 1 ? value : 1) * INVERSE_SIZE : 0;
    const i = v | 0;
    const f = v - i;
    return table[i] + f * (table[i + 1] - table[i]);
  }
  invert(r: number, g: number, b: number, out: Float32Array | Float64Array, offset: number): void {
    const y = LUMA_BT601[0] * r + LUMA_BT601[1] * g + LUMA_BT601[2] * b;
    const s = this.inverseSaturation;
    out[offset] = this.invertTone(y + s * (r - y));
    out[offset + 1] = this.invertTone(y + s * (g - y));
    out[offset + 2] = this.invertTone(y + s * (b - y));
  }
}

/** The last few inverse tables (a series' frames and a photo's light-field rounds share one). */
const inverseTables: Array<{ contrast: number; gamma: number; table: Float64Array }> = [];
/** Forward samples of T per inverse table point: T⁻¹ is read between them by linear interpolation. */
const FORWARD_PER_INVERSE = 4;

/**
 * T⁻¹ tabulated on a uniform grid of T (INVERSE_SIZE + 1 points and a guard): T is sampled on a
 * uniform grid of e four times finer, and each grid value of T is placed between the two samples
 * that bracket it (T is strictly increasing, so one sweep does it).
 */
function inverseToneTable(contrast: number, gamma: number): Float64Array {
  const cached = inverseTables.find((entry) => entry.contrast === contrast && entry.gamma === gamma);
  if (cached) return cached.table;
  const samples = INVERSE_SIZE * FORWARD_PER_INVERSE;
  const forward = new Float64Array(samples + 1);
  for (let k = 0; k <= samples; k++) forward[k] = toneAt(k / samples, contrast, gamma);
  const table = new Float64Array(INVERSE_SIZE + 2);
  let k = 0;
  for (let j = 0; j <= INVERSE_SIZE; j++) {
    const target = j / INVERSE_SIZE;
    while (k < samples - 1 && forward[k + 1] < target) k++;
    const lo = forward[k];
    const hi = forward[k + 1];
    const f = hi > lo ? Math.min(1, Math.max(0, (target - lo) / (hi - lo))) : 0;
    table[j] = (k + f) / samples;
  }
  table[INVERSE_SIZE + 1] = table[INVERSE_SIZE];
  inverseTables.unshift({ contrast, gamma, table });
  if (inverseTables.length > 4) inverseTables.pop();
  return table;
}

/** Plain words for a response, e.g. "contrast +0.35, mid-tone gamma 0.92, saturation ×1.24". */
export function describeResponse(response: CameraResponse): string {
  const sign = response.contrast >= 0 ? '+' : '−';
  return `contrast ${sign}${Math.abs(response.contrast).toFixed(2)}, mid-tone gamma ${response.gamma.toFixed(2)}, saturation ×${response.saturation.toFixed(2)}`;
}

/**
 * Whether a response is a picture style worth telling the user about (a judgement: about
 * 2 % of full scale in the mid-tones from the curve, or 5 % more or less chroma).
 */
export function isStrongResponse(response: CameraResponse | null | undefined): boolean {
  if (!response) return false;
  let largest = 0;
  for (let j = 1; j < 20; j++) {
    const e = j / 20;
    largest = Math.max(largest, Math.abs(toneAt(e, response.contrast, response.gamma) - e));
  }
  return largest > 0.02 || Math.abs(response.saturation - 1) > 0.05;
}

function clampUnit(value: number): number {
  return value < 0 ? 0 : value > 1 ? 1 : value;
}
