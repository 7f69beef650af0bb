/**
 * Colour of a thickness from the colour bar's stops, by linear interpolation of the stops'
 * encoded sRGB values (for chart accents such as histogram bars; the map image itself is drawn
 * by the caller). Stops are `{ nm, hex }` with `#rrggbb` colours.
 */

export interface ColourStop {
  nm: number;
  hex: string;
}

const hexPattern = /^#[0-9a-fA-F]{6}$/;

/** Checks and sorts colour stops; throws naming the stop that is wrong. */
export function checkColourStops(stops: ReadonlyArray<ColourStop>, name = 'colourBar.stops'): ColourStop[] {
  if (!Array.isArray(stops) || stops.length === 0) {
    throw new TypeError(`${name} must be a non-empty array of { nm, hex }, received ${Array.isArray(stops) ? 'an empty array' : typeof stops}`);
  }
  stops.forEach((stop, i) => {
    if (!Number.isFinite(stop?.nm)) throw new RangeError(`${name}[${i}].nm must be a finite number, received ${stop?.nm}`);
    if (typeof stop.hex !== 'string' || !hexPattern.test(stop.hex)) {
      throw new TypeError(`${name}[${i}].hex must be a colour like #1a2b3c, received ${JSON.stringify(stop.hex)}`);
    }
  });
  return [...stops].sort((a, b) => a.nm - b.nm);
}

/** Interpolated `#rrggbb` at `nm`; clamps to the end stops. `stops` must be sorted (see above). */
export function colourAtNm(stops: ReadonlyArray<ColourStop>, nm: number): string {
  if (nm <= stops[0].nm || stops.length === 1) return stops[0].hex.toLowerCase();
  const last = stops[stops.length - 1];
  if (nm >= last.nm) return last.hex.toLowerCase();
  let i = 1;
  while (stops[i].nm < nm) i++;
  const a = stops[i - 1];
  const b = stops[i];
  const t = b.nm === a.nm ? 0 : (nm - a.nm) / (b.nm - a.nm);
  let out = '#';
  for (let c = 0; c < 3; c++) {
    const va = parseInt(a.hex.slice(1 + 2 * c, 3 + 2 * c), 16);
    const vb = parseInt(b.hex.slice(1 + 2 * c, 3 + 2 * c), 16);
    out += Math.round(va + (vb - va) * t).toString(16).padStart(2, '0');
  }
  return out;
}
