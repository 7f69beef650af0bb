/**
 * Lamella's thickness colour scale ("strata"): a path through CIELAB whose lightness rises
 * strictly from L* 14 to L* 95 while the hue turns from deep indigo through teal and moss to a
 * pale sand, so thin reads dark and thick reads light, neighbouring thicknesses stay
 * distinguishable, and the map prints readably in grey. Never a rainbow: hue changes slowly
 * and monotonically, lightness carries the order. Built once: 256 sRGB entries, from CIELAB
 * (D65 white) through XYZ to sRGB (IEC 61966-2-1), chroma reduced where a colour would fall
 * outside the sRGB gamut.
 */
import { convertLabToXyz } from '../colour/lab.js';
import { SRGB_WHITE_XYZ, XYZ_TO_LINEAR_SRGB, encodeSrgb } from '../colour/srgb.js';

export const SCALE_ENTRIES = 256;

let cached: Uint8Array | null = null;

/** 256 × 3 sRGB bytes; index 0 = thinnest, 255 = thickest. */
export function colourScaleBytes(): Uint8Array {
  if (cached) return cached;
  const out = new Uint8Array(SCALE_ENTRIES * 3);
  const white = SRGB_WHITE_XYZ.map((v) => v * 100);
  const lightness = (t: number): number => 14 + 81 * t;
  const hueDeg = (t: number): number => 295 - 215 * t; // indigo 295° → teal ~190° → moss ~120° → sand 80°
  // Wanted chroma, limited to what sRGB can show along the path, then smoothed (moving
  // minimum, then moving mean) so the scale has no visible bands.
  const chroma = new Float64Array(SCALE_ENTRIES);
  for (let i = 0; i < SCALE_ENTRIES; i++) {
    const t = i / (SCALE_ENTRIES - 1);
    let c = 14 + 30 * Math.pow(Math.sin(Math.PI * t), 0.8);
    while (c > 0 && labToSrgb(lightness(t), c, hueDeg(t), white) === null) c -= 0.25;
    chroma[i] = c;
  }
  const smooth = movingMean(movingMin(chroma, 24), 24);
  for (let i = 0; i < SCALE_ENTRIES; i++) {
    const t = i / (SCALE_ENTRIES - 1);
    const bytes = labToSrgb(lightness(t), smooth[i], hueDeg(t), white) ?? [0, 0, 0];
    out[i * 3] = bytes[0];
    out[i * 3 + 1] = bytes[1];
    out[i * 3 + 2] = bytes[2];
  }
  cached = out;
  return out;
}

function labToSrgb(lightness: number, chroma: number, hueDeg: number, white: number[]): [number, number, number] | null {
  const h = (hueDeg * Math.PI) / 180;
  const xyz = convertLabToXyz([lightness, chroma * Math.cos(h), chroma * Math.sin(h)], white);
  const m = XYZ_TO_LINEAR_SRGB;
  const out: [number, number, number] = [0, 0, 0];
  for (let c = 0; c < 3; c++) {
    const linear = (m[c * 3] * xyz[0] + m[c * 3 + 1] * xyz[1] + m[c * 3 + 2] * xyz[2]) / 100;
    if (linear < -1e-4 || linear > 1 + 1e-4) return null;
    out[c] = Math.round(255 * encodeSrgb(Math.min(1, Math.max(0, linear))));
  }
  return out;
}

/** Hex colour stops (every 1/8 of the scale) for reports and colour bars. */
export function colourScaleStops(minNm: number, maxNm: number): Array<{ nm: number; hex: string }> {
  const bytes = colourScaleBytes();
  const stops: Array<{ nm: number; hex: string }> = [];
  for (let s = 0; s <= 16; s++) {
    const index = Math.round((s / 16) * (SCALE_ENTRIES - 1));
    const hex = `#${[0, 1, 2].map((c) => bytes[index * 3 + c].toString(16).padStart(2, '0')).join('')}`;
    stops.push({ nm: minNm + (s / 16) * (maxNm - minNm), hex });
  }
  return stops;
}

function movingMin(values: Float64Array, radius: number): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) {
    let m = Infinity;
    for (let j = Math.max(0, i - radius); j <= Math.min(values.length - 1, i + radius); j++) m = Math.min(m, values[j]);
    out[i] = m;
  }
  return out;
}

function movingMean(values: Float64Array, radius: number): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) {
    let sum = 0;
    let n = 0;
    for (let j = Math.max(0, i - radius); j <= Math.min(values.length - 1, i + radius); j++) {
      sum += values[j];
      n++;
    }
    out[i] = sum / n;
  }
  return out;
}
