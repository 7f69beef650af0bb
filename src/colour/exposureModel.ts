/**
 * The forward photo model shared by the renderer and the thickness mapper:
 *   encoded_c = encode( clamp01( exposure · wbGain_c · rgbLinear_c(d) + flare_c + noise_c ) )
 * rgbLinear is the camera's linear RGB of the film (./camera.ts); `exposure` is an overall gain,
 * `wbGain` per-channel white-balance gains, `flare` an additive linear offset (veiling glare,
 * common practice to model it as a constant), `noise` Gaussian sensor noise of standard deviation
 * `noiseSigma` in linear units. `encode` is the sRGB transfer function (IEC 61966-2-1) for sRGB
 * cameras and the identity for linear (raw) cameras.
 */

export interface PhotoFormation {
  readonly exposure: number;
  readonly whiteBalance: readonly [number, number, number];
  readonly flare: readonly [number, number, number];
}

export interface PhotoFormationInput {
  readonly exposure?: number;
  readonly whiteBalance?: readonly [number, number, number];
  /** A scalar applies to all three channels. */
  readonly flare?: number | readonly [number, number, number];
}

export const DEFAULT_PHOTO_FORMATION: PhotoFormation = { exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] };

/** Fills defaults and validates: exposure > 0, gains > 0, flare finite (may be negative, e.g. a dark offset). */
export function checkPhotoFormation(input: PhotoFormationInput = {}): PhotoFormation {
  const exposure = input.exposure ?? 1;
  if (typeof exposure !== 'number' || !Number.isFinite(exposure) || exposure <= 0) {
    throw new RangeError(`exposure must be a finite number > 0, received ${String(exposure)}`);
  }
  const whiteBalance = input.whiteBalance ?? [1, 1, 1];
  if (!Array.isArray(whiteBalance) || whiteBalance.length !== 3 || whiteBalance.some((g) => !Number.isFinite(g) || g <= 0)) {
    throw new RangeError(`whiteBalance must be three finite gains > 0, received ${JSON.stringify(whiteBalance)}`);
  }
  const rawFlare = input.flare ?? 0;
  const flare = typeof rawFlare === 'number' ? ([rawFlare, rawFlare, rawFlare] as const) : rawFlare;
  if (!Array.isArray(flare) || flare.length !== 3 || flare.some((f) => !Number.isFinite(f) || Math.abs(f) >= 1)) {
    throw new RangeError(`flare must be a finite number or three numbers with |flare| < 1 (linear units), received ${JSON.stringify(rawFlare)}`);
  }
  return { exposure, whiteBalance: [whiteBalance[0], whiteBalance[1], whiteBalance[2]], flare: [flare[0], flare[1], flare[2]] };
}

/** Linear value recorded in channel c before clamping and encoding (no noise). */
export function formLinear(rgbLinearC: number, channel: 0 | 1 | 2, p: PhotoFormation): number {
  return p.exposure * p.whiteBalance[channel] * rgbLinearC + p.flare[channel];
}

/**
 * Encoded pixel (0..1 per channel) predicted for a film colour: writes 3 values into `out` at
 * `offset`. `encode` maps clamped linear 0..1 to encoded 0..1 (e.g. createSrgbEncoder(), or the
 * identity for a linear camera).
 */
export function predictEncodedPixel(
  rgbLinear: ArrayLike<number>,
  p: PhotoFormation,
  encode: (linear: number) => number,
  out: Float64Array | Float32Array,
  offset = 0,
): void {
  for (let c = 0; c < 3; c++) {
    const v = p.exposure * p.whiteBalance[c] * rgbLinear[c] + p.flare[c];
    out[offset + c] = encode(v < 0 ? 0 : v > 1 ? 1 : v);
  }
}

/** The identity encoding of linear (raw) cameras, with clamping to 0..1. */
export function encodeLinear(linear: number): number {
  return linear < 0 ? 0 : linear > 1 ? 1 : linear;
}
