/**
 * The colour-versus-thickness table the mapper searches: a uniform thickness grid
 * (start + i·step, never a running sum) with the camera's linear RGB for each thickness, and
 * the photo-formation model that turns it into the encoded values a photo would hold:
 *
 *   encoded_c(d) = encode( exposure · (W(wb) · rgbLinear(d))_c + flare_c ),  c ∈ {R, G, B}
 *
 * W(wb) are white-balance gains on the camera's own channels (see ../colour/exposureModel.ts).
 *
 * `encode` is the sRGB transfer function (IEC 61966-2-1:1999) for JPEG/PNG photos, or the
 * identity for linear raw images. For sRGB photos the camera's response (its picture style: a tone
 * curve and a saturation factor, ../colour/toneResponse.ts) is applied after the encode when the
 * parameters carry one, so every consumer of the predicted table sees it.
 */
import type { ExposureParameters } from './types.js';
import { createSrgbEncoder } from '../colour/srgbEncoderTable.js';
import { balanceTable } from '../colour/exposureModel.js';
import { applyResponse } from '../colour/toneResponse.js';

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
  const { flare } = parameters;
  const linearOut = table.encoding === 'linear';
  const balanced = balanceTable(table.rgbLinear, parameters, table.encoding, scratchFor(table.rgbLinear.length));
  for (let i = 0; i < table.count; i++) {
    const o = i * 3;
    const r = clampUnit(balanced[o] + flare[0]);
    const g = clampUnit(balanced[o + 1] + flare[1]);
    const b = clampUnit(balanced[o + 2] + flare[2]);
    out[o] = linearOut ? r : encodeFast(r);
    out[o + 1] = linearOut ? g : encodeFast(g);
    out[o + 2] = linearOut ? b : encodeFast(b);
  }
  if (!linearOut) applyResponse(out, table.count, parameters.response);
  return out;
}

/** Tabulated sRGB encoding (../colour/srgbEncoderTable.ts, within 1e-6 of IEC 61966-2-1). */
const encodeFast = createSrgbEncoder();

let scratch = new Float64Array(0);
function scratchFor(length: number): Float64Array {
  if (scratch.length < length) scratch = new Float64Array(length);
  return scratch.length === length ? scratch : scratch.subarray(0, length);
}

function clampUnit(value: number): number {
  return value < 0 ? 0 : value > 1 ? 1 : value;
}
