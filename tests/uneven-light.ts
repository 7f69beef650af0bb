// The uneven light of the light-field tests (invented scene conditions): a 35 % fall-off along a
// tilted direction (a diffuse panel off to one side) times lens vignetting of the cos⁴ form
// (cos⁴ law of illumination, common practice) scaled to 25 % at the corners.

/** Relative light at pixel (x, y) of a width × height photo (1 at the brightest, unvignetted point). */
export function unevenGainAt(x: number, y: number, width: number, height: number): number {
  const u = x / (width - 1);
  const v = y / (height - 1);
  const along = 0.8 * u + 0.6 * v - 0.1 * Math.min(u, v);
  const falloff = 1 - 0.35 * Math.min(1, Math.max(0, along / 1.3));
  const rNorm = Math.hypot(x - width / 2, y - height / 2) / Math.hypot(width / 2, height / 2);
  const theta = Math.atan(rNorm * Math.tan(Math.acos(Math.pow(0.75, 0.25))));
  return falloff * Math.pow(Math.cos(theta), 4);
}
