/**
 * Honest limits read off the predicted colour table:
 * - the dark limit: for a film whose reflectance vanishes as it thins (a free film, a film on a
 *   substrate of similar index), the thickness below which its brightness cannot be told from
 *   the flare within the photo's noise: darker pixels are "thinner than this, or no film";
 * - the wash-out limit: the thickness beyond which white-light colours no longer vary by more
 *   than the noise over an interference order (higher orders average to white), so estimates
 *   beyond it are not made.
 */
export interface TableLimits {
  /** Table index of the dark limit (0 when the film never looks dark). */
  readonly darkLimitIndex: number;
  /** Encoded brightness (brightest channel) below which a pixel counts as too dark to measure. */
  readonly darkLuma: number;
  /** First table index whose colours are washed out (count when never). */
  readonly washoutIndex: number;
}

/**
 * Brightness for the dark test: the brightest encoded channel. A black film is dark in every
 * channel, while a saturated interference colour (a first-order purple can clip green to 0) is
 * not, even when its luma is low.
 */
export function brightnessOf(r: number, g: number, b: number): number {
  return r > g ? (r > b ? r : b) : g > b ? g : b;
}

export function lumaOf(r: number, g: number, b: number): number {
  // Rec. 709 / sRGB luma weights (IEC 61966-2-1 primaries), applied to encoded values.
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

export function tableLimits(
  predicted: Float32Array,
  rgbLinear: Float64Array,
  count: number,
  noiseSigma: number,
  periodIndex: number,
): TableLimits {
  const luma = new Float32Array(count);
  let minLuma = Infinity;
  for (let i = 0; i < count; i++) {
    luma[i] = brightnessOf(predicted[i * 3], predicted[i * 3 + 1], predicted[i * 3 + 2]);
    if (luma[i] < minLuma) minLuma = luma[i];
  }
  const vanishing = rgbLinear[0] + rgbLinear[1] + rgbLinear[2] < 0.03;
  let darkLimitIndex = 0;
  let darkLuma = minLuma - 6 * noiseSigma;
  if (vanishing) {
    const threshold = luma[0] + 4 * noiseSigma;
    while (darkLimitIndex + 1 < count && luma[darkLimitIndex] < threshold) darkLimitIndex++;
    darkLuma = luma[darkLimitIndex];
  }
  const washoutIndex = findWashout(predicted, count, noiseSigma, Math.max(2, periodIndex));
  return { darkLimitIndex, darkLuma, washoutIndex };
}

function findWashout(predicted: Float32Array, count: number, noiseSigma: number, window: number): number {
  const threshold = 10 * noiseSigma;
  for (let i = window; i < count; i += Math.max(1, window >> 3)) {
    let minR = Infinity;
    let maxR = -Infinity;
    let minB = Infinity;
    let maxB = -Infinity;
    const end = Math.min(count, i + window);
    for (let j = i; j < end; j++) {
      const g = predicted[j * 3 + 1];
      const cr = predicted[j * 3] - g;
      const cb = predicted[j * 3 + 2] - g;
      if (cr < minR) minR = cr;
      if (cr > maxR) maxR = cr;
      if (cb < minB) minB = cb;
      if (cb > maxB) maxB = cb;
    }
    if (end - i < window) break;
    if (Math.max(maxR - minR, maxB - minB) < threshold) return i;
  }
  return count;
}
