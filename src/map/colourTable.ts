/**
 * The colour-versus-thickness table the mapper searches: a uniform thickness grid
 * (start + i·step, never a running sum) with the camera's linear RGB for each thickness, and
 * the photo-formation model that turns it into the encoded values a photo would hold:
 *
 *   encoded_c(d) = encode( exposure · wb_c · rgbLinear_c(d) + flare_c ),  c ∈ {R, G, B}
 *
 * `encode` is the sRGB transfer function (IEC 61966-2-1:1999) for JPEG/PNG photos, or the
 * identity for linear raw images.
 */
import type { ExposureParameters } from './types.js';
import { encodeSrgbFast } from './transferCurve.js';

export interface ColourTable {
  readonly startNm: number;
  readonly stepNm: number;
  readonly count: number;
  /** count × 3 linear RGB, row-major (white reflector = 1,1,1 for a balanced camera). */
  readonly rgbLinear: Float64Array;
  readonly encoding: 'srgb' | 'linear';
}

export function thicknessAt(table: ColourTable, index: number): number {
  return table.startNm + index * table.stepNm;
}

/**
 * Predicted encoded colours (count × 3, Float32) for given photo-formation parameters.
 * Values are clamped to [0, 1] before encoding, as a camera clips.
 */
export function predictEncodedTable(
  table: ColourTable,
  parameters: ExposureParameters,
  out: Float32Array = new Float32Array(table.count * 3),
): Float32Array {
  const { exposure, whiteBalance, flare } = parameters;
  const gain0 = exposure * whiteBalance[0];
  const gain1 = exposure * whiteBalance[1];
  const gain2 = exposure * whiteBalance[2];
  const linearOut = table.encoding === 'linear';
  const rgb = table.rgbLinear;
  for (let i = 0; i < table.count; i++) {
    const o = i * 3;
    const r = clampUnit(gain0 * rgb[o] + flare[0]);
    const g = clampUnit(gain1 * rgb[o + 1] + flare[1]);
    const b = clampUnit(gain2 * rgb[o + 2] + flare[2]);
    out[o] = linearOut ? r : encodeSrgbFast(r);
    out[o + 1] = linearOut ? g : encodeSrgbFast(g);
    out[o + 2] = linearOut ? b : encodeSrgbFast(b);
  }
  return out;
}

function clampUnit(value: number): number {
  return value < 0 ? 0 : value > 1 ? 1 : value;
}
