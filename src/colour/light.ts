/**
 * A light (illuminant) as a data record: a relative spectral power distribution on its own
 * sampling, plus what it is and where it comes from. `kind: 'line'` is an ideal monochromatic
 * line: a single wavelength, integrated exactly (the camera's integration grid becomes that
 * one wavelength), which is a 1-nm-wide bin of the colour-matching functions evaluated at the
 * line's own wavelength.
 */
import { resampleLinear } from './spectralGrid.js';

export interface Light {
  /** As the user names it: `D65`, `LED-B3`, `blackbody:3200`, `line:589.3`, or a file path. */
  readonly name: string;
  readonly description: string;
  /** Citation of the data, or `user file …`. */
  readonly source: string;
  readonly kind: 'spectrum' | 'line';
  /** Native sampling, strictly increasing (one entry for a line). */
  readonly wavelengthsNm: Float64Array;
  /** Relative spectral power at `wavelengthsNm` (arbitrary scale). */
  readonly relativeSpd: Float64Array;
  /** For `kind: 'line'`: the line's wavelength in nm. */
  readonly lineNm?: number;
}

/**
 * The light's relative SPD at each wavelength of `gridNm` (linear interpolation, 0 outside the
 * tabulated range). For a line, 1 at the line's wavelength and 0 elsewhere.
 */
export function lightOnGrid(light: Light, gridNm: Float64Array): Float64Array {
  if (light.kind === 'line') {
    const out = new Float64Array(gridNm.length);
    for (let i = 0; i < gridNm.length; i++) if (gridNm[i] === light.lineNm) out[i] = 1;
    return out;
  }
  return resampleLinear(light.wavelengthsNm, light.relativeSpd, gridNm, 0);
}
