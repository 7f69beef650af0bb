// Photo effects as a camera makes them, for the invented light scenes (bench/light-scenes.js).
// EVERYTHING HERE IS OUR OWN SCENE-MAKING, not a model of any particular camera or lamp.
//
// Applied in this order, each optional per scene (bench/field-scenes.js, exposeCanvas):
//
// 1. Uneven light, in linear light, before flare and sensor noise: the exposure at every pixel
//    (film, surroundings and glints alike) is multiplied by
//
//        gain(x, y) = falloff(t) · vignetting(r)
//
//    falloff(t) = 1 − F · (1 − e^(−a·t)) / (1 − e^(−a))       (1 at t = 0, 1 − F at t = 1)
//      t: position along the light's direction (an angle not along the photo's axes), 0 at the
//      photo's corner nearest the lamp and 1 at the farthest one; F the fall-off (0.35), a its
//      steepness (the light drops faster near the lamp, as from a diffuse panel or a ring light
//      off to one side). Smooth, monotone, and not a polynomial.
//    vignetting(r) = cos⁴ θ with tan θ = r / f, i.e. 1 / (1 + (r/f)²)²  (the cos⁴ law of natural
//      vignetting, common practice); r the distance of the pixel centre from the photo centre in
//      pixels, f chosen so that the corners (r = half the diagonal) keep 1 − V (V = 0.25).
//    The product is divided by its largest value over the photo: the photographer exposes for the
//    brightest part, which keeps the scene's exposure (the ratios between pixels are the formula's).
//
// 2. A picture style, on the ENCODED values (code / 255, before 8-bit rounding and JPEG), as a
//    camera's "standard" JPEG rendering does:
//
//    tone curve, per channel:  T(e) = (1 − w)·e + w · (L(e) − L(0)) / (L(1) − L(0)),
//                              L(e) = 1 / (1 + exp(−k·(e − p)))
//      a logistic S-curve (steepness k, pivot p) renormalised to pass through 0 and 1, blended
//      with the identity (weight w). Monotone for k > 0 and 0 ≤ w ≤ 1; not a polynomial.
//    then saturation, about BT.601 luma (ITU-R BT.601 luma weights, common practice):
//                              Y = 0.299·R + 0.587·G + 0.114·B,  X' = clip(Y + s·(X − Y), 0, 1)
//      i.e. Cb and Cr of BT.601 YCbCr scaled by s (1.25) with Y kept; greys are unchanged.
//
// The truth of each effect (the gain field per pixel, the curve's parameters) is kept in the scene
// record so that a fitted field or curve can be compared with it.

/**
 * @typedef {{ falloff: number, directionDeg: number, steepness: number, vignettingLoss: number }} UnevenLightSpec
 *   falloff F (0.35 = 35 %), the direction the light falls off towards (degrees from +x, y down),
 *   the steepness a, and the vignetting loss V at the photo's corners (0.25 = 25 %)
 * @typedef {UnevenLightSpec & { gain: Float32Array, focalPx: number, width: number, height: number }} UnevenLight
 *   the spec, the gain per pixel (row-major, falloff × vignetting divided by its largest value, so
 *   that the brightest pixel keeps the scene's exposure) and the focal length f in pixels of the vignetting
 * @typedef {{ steepness: number, pivot: number, blend: number, saturation: number }} PictureStyle
 *   tone curve k, p, w and the saturation factor s of the header
 */

/** Uneven light of the issue: a 35 % fall-off along a tilted direction times 25 % vignetting. */
export const UNEVEN_LIGHT = /** @type {const} */ ({ falloff: 0.35, directionDeg: 32, steepness: 1.6, vignettingLoss: 0.25 });

/** A picture style of our own: a moderate contrast S-curve and a saturation boost of 1.25. */
export const PICTURE_STYLE = /** @type {const} */ ({ steepness: 5.5, pivot: 0.46, blend: 0.75, saturation: 1.25 });

/** The focal length (px) for which cos⁴ vignetting leaves 1 − loss at distance rCornerPx. */
export function vignettingFocalPx(/** @type {number} */ rCornerPx, /** @type {number} */ loss) {
  return rCornerPx / Math.sqrt(1 / Math.sqrt(1 - loss) - 1);
}

/** cos⁴ θ with tan θ = r / f. */
export function vignetting(/** @type {number} */ rPx, /** @type {number} */ focalPx) {
  const q = 1 + (rPx / focalPx) ** 2;
  return 1 / (q * q);
}

/** The fall-off factor at position t (0..1) along the light's direction. */
export function falloffAt(/** @type {number} */ t, /** @type {number} */ falloff, /** @type {number} */ steepness) {
  return 1 - (falloff * (1 - Math.exp(-steepness * t))) / (1 - Math.exp(-steepness));
}

/**
 * The gain field of uneven light on a width × height photo (pixel centres), see the header.
 * @param {number} width @param {number} height @param {UnevenLightSpec} spec
 * @returns {UnevenLight}
 */
export function unevenLight(width, height, spec) {
  if (!(spec.falloff >= 0 && spec.falloff < 1) || !(spec.vignettingLoss >= 0 && spec.vignettingLoss < 1) || !(spec.steepness > 0)) {
    throw new RangeError(`unevenLight: falloff and vignettingLoss must lie in [0, 1) and steepness be > 0, received ${JSON.stringify(spec)}`);
  }
  const angleRad = (spec.directionDeg * Math.PI) / 180;
  const dx = Math.cos(angleRad);
  const dy = Math.sin(angleRad);
  // extent of the photo along the direction: its corners, relative to the centre
  const reach = (Math.abs(dx) * width) / 2 + (Math.abs(dy) * height) / 2;
  const rCorner = Math.hypot(width / 2, height / 2);
  const focalPx = spec.vignettingLoss > 0 ? vignettingFocalPx(rCorner, spec.vignettingLoss) : Infinity;
  const gain = new Float32Array(width * height);
  for (let y = 0, p = 0; y < height; y++) {
    const ry = y + 0.5 - height / 2;
    for (let x = 0; x < width; x++, p++) {
      const rx = x + 0.5 - width / 2;
      const t = (rx * dx + ry * dy + reach) / (2 * reach);
      gain[p] = falloffAt(t, spec.falloff, spec.steepness) * vignetting(Math.hypot(rx, ry), focalPx);
    }
  }
  // the photographer exposes for the brightest part: it keeps the scene's exposure
  let peak = 0;
  for (let p = 0; p < gain.length; p++) if (gain[p] > peak) peak = gain[p];
  for (let p = 0; p < gain.length; p++) gain[p] /= peak;
  return { ...spec, gain, focalPx, width, height };
}

/**
 * The picture style's tone curve as a function of an encoded value (0..1), see the header.
 * @param {Pick<PictureStyle, 'steepness' | 'pivot' | 'blend'>} style
 * @returns {(encoded: number) => number}
 */
export function toneCurve(style) {
  const { steepness: k, pivot: p, blend: w } = style;
  if (!(k > 0) || !(w >= 0 && w <= 1)) throw new RangeError(`toneCurve: steepness must be > 0 and blend in [0, 1], received ${JSON.stringify(style)}`);
  const logistic = (/** @type {number} */ e) => 1 / (1 + Math.exp(-k * (e - p)));
  const l0 = logistic(0);
  const span = logistic(1) - l0;
  return (e) => (1 - w) * e + (w * (logistic(e) - l0)) / span;
}

/**
 * Applies a picture style to one encoded RGB triple in place (tone curve per channel, then the
 * saturation about BT.601 luma, clipped to 0..1).
 * @param {(encoded: number) => number} curve from toneCurve()
 * @param {number} saturation
 * @param {Float64Array} rgb three encoded values (0..1)
 */
export function applyPictureStyle(curve, saturation, rgb) {
  const r = curve(rgb[0]);
  const g = curve(rgb[1]);
  const b = curve(rgb[2]);
  const luma = 0.299 * r + 0.587 * g + 0.114 * b;
  const r2 = luma + saturation * (r - luma);
  const g2 = luma + saturation * (g - luma);
  const b2 = luma + saturation * (b - luma);
  rgb[0] = r2 < 0 ? 0 : r2 > 1 ? 1 : r2;
  rgb[1] = g2 < 0 ? 0 : g2 > 1 ? 1 : g2;
  rgb[2] = b2 < 0 ? 0 : b2 > 1 ? 1 : b2;
}
