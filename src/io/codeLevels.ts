/**
 * What an 8-bit code stands for: code v is v / 255, rounded to float32 (how every 8-bit sample is
 * scaled to 0..1). The reader's floats, the mapper's reads of a photo held as codes
 * (../map/photoPixels.ts) and the evening of such a photo all take their values from this table,
 * so they are the same numbers.
 */
export const LEVELS_8: Float32Array = (() => {
  const levels = new Float32Array(256);
  const scale = 1 / 255;
  for (let v = 0; v < 256; v++) levels[v] = v * scale;
  return levels;
})();

/** codes[offset], codes[offset + 1], … as their values, filling `out`; returns `out`. */
export function codesToFloats(codes: Uint8Array, offset: number, out: Float32Array): Float32Array {
  const levels = LEVELS_8;
  for (let k = 0; k < out.length; k++) out[k] = levels[codes[offset + k]];
  return out;
}
