/**
 * How well a neutral grey surface explains each cell's colour, under the fitted photo formation.
 *
 * A spectrally flat reflector of reflectance k (steel, a grey bench, a white card, a shadow on
 * them) has the camera's linear RGB (k, k, k) when the camera is balanced to the light (the colour
 * table's convention: a white reflector is 1, 1, 1). Through the same photo formation as the film
 * (exposure, white balance, flare, encoding: colourTable.ts) the greys form a curve in the
 * matching space; a cell's squared distance to that curve says whether its colour needs a film at
 * all. Colours that a grey gives within the noise allowance carry no evidence of a film.
 */
import { type ColourTable, predictEncodedTable } from './colourTable.js';
import { type MatchSpace, toMatchSpace } from './matchSpace.js';
import type { ExposureParameters } from './types.js';

/** Grey levels on the curve (reflectance 0 … 1 in equal steps). */
const GREY_LEVELS = 256;

/** The predicted colours of neutral reflectances 0 … 1 (GREY_LEVELS × 3), in the matching space. */
export function predictGreyCurve(table: ColourTable, parameters: ExposureParameters, space: MatchSpace | null): Float32Array {
  const rgbLinear = new Float64Array(GREY_LEVELS * 3);
  for (let i = 0; i < GREY_LEVELS; i++) rgbLinear.fill(i / (GREY_LEVELS - 1), i * 3, i * 3 + 3);
  const encoded = predictEncodedTable({ startNm: 0, stepNm: 1, count: GREY_LEVELS, rgbLinear, encoding: table.encoding }, parameters);
  return space ? toMatchSpace(space, encoded, new Float32Array(encoded.length)) : encoded;
}

/**
 * Marks the cells (out: 1) whose colour (cellColour, matching space, 3 per cell) lies within
 * `allowance` (squared distance) of the grey curve. Cells with `selected[c] === 0` stay 0.
 */
export function markGreyExplained(cellColour: Float32Array, selected: Uint8Array, greyCurve: Float32Array, allowance: number, out: Uint8Array): Uint8Array {
  const levels = greyCurve.length / 3;
  for (let c = 0; c < selected.length; c++) {
    out[c] = 0;
    if (!selected[c]) continue;
    const r = cellColour[c * 3];
    const g = cellColour[c * 3 + 1];
    const b = cellColour[c * 3 + 2];
    // The curve is smooth and each channel rises with the reflectance: search every COARSE-th
    // level, then every level within COARSE of the nearest.
    let bestLevel = 0;
    let best = Infinity;
    for (let i = 0; i < levels; i += COARSE) {
      const d = squaredDistance(greyCurve, i, r, g, b);
      if (d < best) {
        best = d;
        bestLevel = i;
      }
    }
    const last = Math.min(levels - 1, bestLevel + COARSE);
    for (let i = Math.max(0, bestLevel - COARSE); i <= last; i++) best = Math.min(best, squaredDistance(greyCurve, i, r, g, b));
    out[c] = best <= allowance ? 1 : 0;
  }
  return out;
}

/** Step of the coarse search along the grey curve. */
const COARSE = 8;

function squaredDistance(curve: Float32Array, i: number, r: number, g: number, b: number): number {
  const dr = r - curve[i * 3];
  const dg = g - curve[i * 3 + 1];
  const db = b - curve[i * 3 + 2];
  return dr * dr + dg * dg + db * db;
}
