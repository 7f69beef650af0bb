/**
 * Pixels where the fringes are too dense for the camera (thickness changing by more than about
 * λ/(16n) per pixel): the intensity then jumps from pixel to pixel instead of following smooth
 * fringes, zones of different orders run into each other and a fringe count through them is
 * meaningless. Such pixels are found by their roughness, the 3 × 3 mean of |level − 3 × 3 smoothed
 * level| (for resolved fringes of period P pixels it is ~(2π/P)²/6 of the fringe swing, so about
 * 0.1 at P = 6 px; for noise alone about the noise level). They are widened by one pixel so they
 * cut every path between zones through them. Threshold: our choice.
 */
import { boxMeanMasked } from './boxMean.js';
import { usableQuantiles } from './fringeExtremes.js';

export function findUnresolvedFringes(
  levelRaw: Float32Array,
  levelSmooth: Float32Array,
  usable: Uint8Array,
  width: number,
  height: number,
  noiseLevel: number,
): Uint8Array {
  const n = width * height;
  const deviation = new Float32Array(n);
  for (let p = 0; p < n; p++) deviation[p] = usable[p] ? Math.abs(levelRaw[p] - levelSmooth[p]) : 0;
  const roughness = boxMeanMasked(deviation, width, height, usable, 1);
  const limit = Math.max(0.1, 3 * noiseLevel);
  const rough = new Uint8Array(n);
  for (let p = 0; p < n; p++) if (usable[p] && roughness[p] > limit) rough[p] = 1;
  const widened = new Uint8Array(n);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      if (!rough[y * width + x]) continue;
      for (let dy = -1; dy <= 1; dy++) {
        for (let dx = -1; dx <= 1; dx++) {
          const nx = x + dx;
          const ny = y + dy;
          if (nx >= 0 && ny >= 0 && nx < width && ny < height && usable[ny * width + nx]) widened[ny * width + nx] = 1;
        }
      }
    }
  }
  return widened;
}

/**
 * Dense fringes found before the intensity scale is known: levels are taken on the robust range
 * of the film (0.5th to 99.5th percentile of the 5 × 5 smoothed intensity); none without a range.
 */
export function denseFringesOnRange(
  intensity: Float32Array,
  smoothed3: Float32Array,
  smoothed5: Float32Array,
  usable: Uint8Array,
  width: number,
  height: number,
  noise: number,
): Uint8Array {
  const n = width * height;
  const [low, high] = usableQuantiles(smoothed5, usable, [0.005, 0.995]);
  if (!(high > low)) return new Uint8Array(n);
  const scale = 1 / (high - low);
  const levelRaw = new Float32Array(n);
  const levelSmooth = new Float32Array(n);
  for (let p = 0; p < n; p++) {
    levelRaw[p] = (intensity[p] - low) * scale;
    levelSmooth[p] = (smoothed3[p] - low) * scale;
  }
  const noiseLevel = noise * scale;
  return findUnresolvedFringes(levelRaw, levelSmooth, usable, width, height, noiseLevel);
}
