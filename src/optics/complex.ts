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
  // The larger part from the sum, the smaller from b = 2·re·im: (modulus − a) cancels when
  // |b| << a and would drop a small absorption (k below ~1e-8) altogether (Press et al.,
  // Numerical Recipes, §5.4, complex square root, from memory).
  let re: number;
  let im: number;
  if (a >= 0) {
    re = Math.sqrt((modulus + a) / 2);
    im = re === 0 ? 0 : b / (2 * re);
  } else {
    im = Math.sqrt((modulus - a) / 2);
    if (b < 0) im = -im;
    re = b / (2 * im);
  }
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
