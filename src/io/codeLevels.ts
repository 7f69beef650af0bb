/**
 * What a code stands for: 8-bit code v is v / 255 and 16-bit code v is v / 65535, rounded to
 * float32 (how every sample is scaled to 0..1). The reader's floats, the mapper's reads of a photo
 * held as codes (../map/photoPixels.ts) and the evening of such a photo all take their values
 * from these tables, so they are the same numbers.
 */
export const LEVELS_8: Float32Array = levelTable(255);

let levels16: Float32Array | null = null;

/** The 65,536 levels of 16-bit codes (256 KiB, made on first use). */
export function levels16Table(): Float32Array {
  levels16 ??= levelTable(65535);
  return levels16;
}

function levelTable(top: number): Float32Array {
  const levels = new Float32Array(top + 1);
  const scale = 1 / top;
  for (let v = 0; v <= top; v++) levels[v] = v * scale;
  return levels;
}

/** The level table of codes of this width. */
export function levelsOf(codes: Uint8Array | Uint16Array): Float32Array {
  return codes instanceof Uint16Array ? levels16Table() : LEVELS_8;
}

/** codes[offset], codes[offset + 1], … as their values, filling `out`; returns `out`. */
export function codesToFloats(codes: Uint8Array | Uint16Array, offset: number, out: Float32Array): Float32Array {
  // One loop per code width, so that each stays monomorphic (8-bit photos are the common case).
  return codes instanceof Uint16Array ? codes16ToFloats(codes, offset, out) : codes8ToFloats(codes, offset, out);
}

function codes8ToFloats(codes: Uint8Array, offset: number, out: Float32Array): Float32Array {
  const levels = LEVELS_8;
  for (let k = 0; k < out.length; k++) out[k] = levels[codes[offset + k]];
  return out;
}

function codes16ToFloats(codes: Uint16Array, offset: number, out: Float32Array): Float32Array {
  const levels = levels16Table();
  for (let k = 0; k < out.length; k++) out[k] = levels[codes[offset + k]];
  return out;
}
