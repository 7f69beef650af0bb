/**
 * The numbers behind an interference-colour chart: for each film thickness, XYZ of the reflected
 * light under the light (CIE 15:2004 §7, Y_white = 100), the colour as the default camera records
 * it (Bradford-adapted to D65, linear sRGB, IEC 61966-2-1, times an optional exposure gain), its
 * CIELAB relative to D65 (Y = 100),
 * 8-bit sRGB, and the interference order (./orderBoundaries.ts).
 */
import { applyMatrix3 } from '../colour/matrix3.js';
import type { Light } from '../colour/light.js';
import { convertXyzToLab } from '../colour/lab.js';
import { checkObserver, type ObserverName } from '../colour/observers.js';
import { LINEAR_SRGB_TO_XYZ, SRGB_WHITE_XYZ, linearToSrgb8 } from '../colour/srgb.js';
import { srgbCameraMatrix } from '../colour/camera.js';
import { filmWeightedTable } from '../colour/filmColourTable.js';
import { integrationGrid, xyzWeights } from '../colour/xyzWeights.js';
import type { Polarisation, Stack } from '../optics/types.js';
import { orderBoundaries } from './orderBoundaries.js';

export interface ChartOptions {
  readonly stack: Stack;
  readonly light: Light;
  readonly angleRad: number;
  readonly observer?: ObserverName;
  readonly polarisation?: Polarisation;
  readonly filmIndexScale?: number;
  /** Camera white balance left at another light (default: balanced to `light`). */
  readonly whiteBalance?: Light;
  readonly fromNm?: number;
  readonly toNm?: number;
  readonly stepNm?: number;
  /**
   * Gain on the camera's linear RGB (default 1: a perfect white reflector is exactly white).
   * 'auto' scales so the brightest swatch just reaches full scale — useful for weakly reflecting
   * films such as soap films. XYZ stays the physical value under the light; Lab and sRGB follow the gain.
   */
  readonly exposure?: number | 'auto';
}

export interface ChartTable {
  readonly thicknessesNm: Float64Array;
  /** n × 3 each, row-major. */
  readonly xyz: Float64Array;
  readonly rgbLinear: Float64Array;
  readonly lab: Float64Array;
  readonly srgb8: Uint8Array;
  /** Interference order of each row (1-based). */
  readonly order: Uint16Array;
  /** Thicknesses (nm) where orders 2, 3, … begin: successive minima of Y. */
  readonly boundariesNm: readonly number[];
  /** The gain applied to linear RGB (resolved when 'auto'). */
  readonly exposure: number;
}

/** Default thickness range of a chart: 0–1500 nm at 1 nm (covers the orders a practitioner reads by eye). */
export const DEFAULT_CHART_RANGE = { fromNm: 0, toNm: 1500, stepNm: 1 } as const;

export function thicknessRange(fromNm: number, toNm: number, stepNm: number): Float64Array {
  if (!Number.isFinite(fromNm) || fromNm < 0) throw new RangeError(`fromNm must be a finite number >= 0, received ${fromNm}`);
  if (!Number.isFinite(toNm) || toNm <= fromNm) throw new RangeError(`toNm must be a finite number > fromNm (${fromNm}), received ${toNm}`);
  if (!Number.isFinite(stepNm) || stepNm <= 0) throw new RangeError(`stepNm must be a finite number > 0, received ${stepNm}`);
  const count = Math.floor((toNm - fromNm) / stepNm + 1e-9) + 1;
  if (count > 2_000_000) throw new RangeError(`thickness range ${fromNm}–${toNm} nm at ${stepNm} nm gives ${count} rows; expected at most 2000000`);
  const out = new Float64Array(count);
  for (let i = 0; i < count; i++) out[i] = fromNm + i * stepNm;
  return out;
}

/**
 * A thickness–colour chart: for thicknesses `fromNm`…`toNm` every `stepNm`, the colour a film
 * shows under the light (CIE XYZ, CIELAB, camera linear RGB, 8-bit sRGB) and its interference
 * order; what `lamella chart` draws and prints.
 *
 * @param options the stack, light, angle, observer and thickness range
 * @example
 * const chart = chartTable({ stack: resolveStack('oxide-on-silicon'), light: resolveLight('D65'), angleRad: 0, toNm: 500, stepNm: 100 });
 */
export function chartTable(options: ChartOptions): ChartTable {
  const observer = checkObserver(options.observer ?? '1931');
  const thicknessesNm = thicknessRange(
    options.fromNm ?? DEFAULT_CHART_RANGE.fromNm,
    options.toNm ?? DEFAULT_CHART_RANGE.toNm,
    options.stepNm ?? DEFAULT_CHART_RANGE.stepNm,
  );
  const gridNm = integrationGrid(options.light);
  const weights = xyzWeights(options.light, observer, gridNm);
  const xyz = filmWeightedTable(options.stack, gridNm, weights, thicknessesNm, options.angleRad, options.polarisation ?? 'mixed', options.filmIndexScale ?? 1);
  const toRgb = srgbCameraMatrix(options.whiteBalance ?? options.light, observer);
  const n = thicknessesNm.length;
  const rgbLinear = new Float64Array(n * 3);
  const lab = new Float64Array(n * 3);
  const srgb8 = new Uint8Array(n * 3);
  const white = SRGB_WHITE_XYZ.map((v) => v * 100);
  const row = new Float64Array(3);
  for (let i = 0; i < n; i++) {
    row[0] = xyz[i * 3];
    row[1] = xyz[i * 3 + 1];
    row[2] = xyz[i * 3 + 2];
    const rgb = applyMatrix3(toRgb, row);
    for (let c = 0; c < 3; c++) rgbLinear[i * 3 + c] = rgb[c];
  }
  const exposure = resolveExposure(options.exposure ?? 1, rgbLinear);
  for (let i = 0; i < n; i++) {
    const rgb = [rgbLinear[i * 3] * exposure, rgbLinear[i * 3 + 1] * exposure, rgbLinear[i * 3 + 2] * exposure];
    const adapted = applyMatrix3(LINEAR_SRGB_TO_XYZ, rgb);
    const l = convertXyzToLab([adapted[0] * 100, adapted[1] * 100, adapted[2] * 100], white);
    for (let c = 0; c < 3; c++) {
      rgbLinear[i * 3 + c] = rgb[c];
      lab[i * 3 + c] = l[c];
      srgb8[i * 3 + c] = linearToSrgb8(rgb[c]);
    }
  }
  const luminance = new Float64Array(n);
  for (let i = 0; i < n; i++) luminance[i] = xyz[i * 3 + 1];
  const { order, boundariesNm } = orderBoundaries(thicknessesNm, luminance);
  return { thicknessesNm, xyz, rgbLinear, lab, srgb8, order, boundariesNm, exposure };
}

function resolveExposure(exposure: number | 'auto', rgbLinear: Float64Array): number {
  if (exposure === 'auto') {
    let peak = 0;
    for (let i = 0; i < rgbLinear.length; i++) peak = Math.max(peak, rgbLinear[i]);
    return peak > 0 ? 1 / peak : 1;
  }
  if (typeof exposure !== 'number' || !Number.isFinite(exposure) || exposure <= 0) {
    throw new RangeError(`exposure must be a finite number > 0 or 'auto', received ${String(exposure)}`);
  }
  return exposure;
}
