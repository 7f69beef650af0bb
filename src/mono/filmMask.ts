/**
 * Which pixels are film: inside the region (if any), non-zero in the decoded mask (if any), and
 * not transparent in the photo's alpha channel (alpha < 0.5 counts as transparent; our choice).
 */
import type { MapOptions } from '../map/types.js';

export function filmMaskOf(
  width: number,
  height: number,
  options: Pick<MapOptions, 'region'>,
  mask: Uint8Array | null = null,
  alpha: Float32Array | null = null,
): Uint8Array {
  const n = width * height;
  const film = new Uint8Array(n);
  let x0 = 0;
  let y0 = 0;
  let x1 = width;
  let y1 = height;
  const region = options.region ?? null;
  if (region !== null) {
    const [rx, ry, rw, rh] = region;
    if (![rx, ry, rw, rh].every(Number.isInteger) || rw <= 0 || rh <= 0 || rx < 0 || ry < 0 || rx + rw > width || ry + rh > height) {
      throw new RangeError(`region must be integers x,y,width,height inside the ${width}×${height} photo, received ${region.join(',')}`);
    }
    x0 = rx;
    y0 = ry;
    x1 = rx + rw;
    y1 = ry + rh;
  }
  if (mask !== null && mask.length !== n) {
    throw new RangeError(`mask must have ${n} pixels (${width}×${height}), received ${mask.length}`);
  }
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      const p = y * width + x;
      if (mask !== null && mask[p] === 0) continue;
      if (alpha !== null && alpha[p] < 0.5) continue;
      film[p] = 1;
    }
  }
  return film;
}
