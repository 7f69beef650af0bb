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
  // Every second pixel in each direction is plenty for a median and keeps this cheap.
  const responses = new Float32Array(Math.ceil(width / 2) * Math.ceil(height / 2));
  let count = 0;
  for (let y = 1; y < height - 1; y += 2) {
    for (let x = 1; x < width - 1; x += 2) {
      const p = y * width + x;
      const up = p - width;
      const down = p + width;
      if (!usable[up - 1] || !usable[up] || !usable[up + 1] || !usable[p - 1] || !usable[p]) continue;
      if (!usable[p + 1] || !usable[down - 1] || !usable[down] || !usable[down + 1]) continue;
      const r =
        values[up - 1] - 2 * values[up] + values[up + 1] -
        2 * values[p - 1] + 4 * values[p] - 2 * values[p + 1] +
        values[down - 1] - 2 * values[down] + values[down + 1];
      responses[count++] = Math.abs(r);
    }
  }
  if (count === 0) return 0;
  const sorted = responses.subarray(0, count).sort();
  return (1.4826 * sorted[count >> 1]) / 6;
}
