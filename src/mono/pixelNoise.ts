/**
 * Pixel noise of a smooth image: the mask
 *     [ 1 −2  1 ; −2  4 −2 ; 1 −2  1 ]
 * cancels any locally linear (and most smoothly curved) intensity, so its response is almost
 * pure noise, with variance 36 σ² for white noise (sum of squared weights). Method of
 * J. Immerkær, "Fast noise variance estimation", Comput. Vis. Image Underst. 64, 300 (1996)
 * (details from memory); here with a median of |response| (1.4826 · MAD, common practice) instead
 * of the mean, so fringe crests and edges of the film do not inflate the estimate.
 */
export function estimatePixelNoise(values: Float32Array, width: number, height: number, usable: Uint8Array): number {
  const responses: number[] = [];
  for (let y = 1; y < height - 1; y++) {
    for (let x = 1; x < width - 1; x++) {
      const p = y * width + x;
      let all = true;
      for (let dy = -1; dy <= 1 && all; dy++) for (let dx = -1; dx <= 1; dx++) if (!usable[p + dy * width + dx]) all = false;
      if (!all) continue;
      const v = (q: number): number => values[q];
      const r =
        v(p - width - 1) - 2 * v(p - width) + v(p - width + 1) -
        2 * v(p - 1) + 4 * v(p) - 2 * v(p + 1) +
        v(p + width - 1) - 2 * v(p + width) + v(p + width + 1);
      responses.push(Math.abs(r));
    }
  }
  if (responses.length === 0) return 0;
  const sorted = Float64Array.from(responses).sort();
  return (1.4826 * sorted[sorted.length >> 1]) / 6;
}
