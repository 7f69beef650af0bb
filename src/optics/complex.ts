/**
 * Scalar complex helpers for the set-up stage of the optics engine (not used in hot loops, which
 * inline their arithmetic on plain numbers). Complex numbers are `[re, im]` pairs.
 * Branch choice for the normal wave-vector component follows Born & Wolf, Principles of Optics
 * (7th ed.), §1.5 and §14.2: for a wave travelling into a medium, Im(N cosθ) >= 0.
 */

export type Complex = readonly [number, number];

export function cmul(a: Complex, b: Complex): Complex {
  return [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
}

export function cdiv(a: Complex, b: Complex): Complex {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
}

/** Square root with Im >= 0 (and Re >= 0 when Im = 0): the forward/decaying branch. */
export function csqrtForward(z: Complex): Complex {
  const [a, b] = z;
  const modulus = Math.hypot(a, b);
  let re = Math.sqrt(Math.max(0, (modulus + a) / 2));
  let im = Math.sqrt(Math.max(0, (modulus - a) / 2));
  if (b < 0) im = -im;
  if (im < 0 || (im === 0 && re < 0)) {
    re = -re;
    im = -im;
  }
  return [re, im];
}

/** cos z and sin z of a complex argument. */
export function ccosSin(z: Complex): { cos: Complex; sin: Complex } {
  const [a, b] = z;
  const ch = Math.cosh(b);
  const sh = Math.sinh(b);
  const ca = Math.cos(a);
  const sa = Math.sin(a);
  return { cos: [ca * ch, -sa * sh], sin: [sa * ch, ca * sh] };
}
