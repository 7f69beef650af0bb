/**
 * Which pixels of a photo are film to be measured: inside the region (x, y, w, h) or the mask
 * (non-zero pixels), and not transparent (alpha ≥ 0.5). Everything else is excluded from the
 * map, the statistics and the thin fraction.
 */

export function buildFilmMask(
  width: number,
  height: number,
  region: readonly [number, number, number, number] | null | undefined,
  mask: Uint8Array | null,
  alpha: Float32Array | undefined,
): Uint8Array {
  const film = new Uint8Array(width * height);
  let x0 = 0;
  let y0 = 0;
  let x1 = width;
  let y1 = height;
  if (region) {
    checkRegion(region, width, height);
    const [x, y, w, h] = region;
    x0 = x;
    y0 = y;
    x1 = x + w;
    y1 = y + h;
  }
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      const i = y * width + x;
      if (mask && !mask[i]) continue;
      if (alpha && alpha[i] < 0.5) continue;
      film[i] = 1;
    }
  }
  return film;
}

/** Throws a RangeError naming --region unless it lies inside a width × height photo. */
export function checkRegion(region: readonly [number, number, number, number], width: number, height: number, what = 'photo'): void {
  const [x, y, w, h] = region;
  if (!(w > 0 && h > 0) || x < 0 || y < 0 || x + w > width || y + h > height) {
    throw new RangeError(`--region ${x},${y},${w},${h} must lie inside the ${width}×${height} ${what} with positive width and height`);
  }
}
