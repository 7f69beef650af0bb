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
 * `allowance` (squared distance) of the grey curve. Cells with `usable[c] === 0` stay 0.
 */
export function markGreyExplained(cellColour: Float32Array, usable: Uint8Array, greyCurve: Float32Array, allowance: number, out: Uint8Array): Uint8Array {
  const levels = greyCurve.length / 3;
  for (let c = 0; c < usable.length; c++) {
    out[c] = 0;
    if (!usable[c]) continue;
    const r = cellColour[c * 3];
    const g = cellColour[c * 3 + 1];
    const b = cellColour[c * 3 + 2];
    let best = Infinity;
    for (let i = 0; i < levels; i++) {
      const dr = r - greyCurve[i * 3];
      const dg = g - greyCurve[i * 3 + 1];
      const db = b - greyCurve[i * 3 + 2];
      const d = dr * dr + dg * dg + db * db;
      if (d < best) best = d;
    }
    out[c] = best <= allowance ? 1 : 0;
  }
  return out;
}
