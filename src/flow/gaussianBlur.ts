/**
 * Normalised Gaussian smoothing of a grid with holes (normalised convolution, Knutsson & Westin
 * 1993): blur(value · weight) / blur(weight), separable, kernel cut at 3σ. Cells whose smoothed
 * weight stays below `minWeight` of the full kernel get NaN. Used for the pyramid and for the
 * windowed sums of the flow's normal equations (there with `normalise` false: plain weighted sums).
 */

const kernels = new Map<number, Float32Array>();

/** Gaussian taps for σ (px), cut at 3σ, summing to 1; index r = offset from the centre + radius. */
export function gaussianKernel(sigmaPx: number): Float32Array {
  if (!(sigmaPx > 0 && Number.isFinite(sigmaPx))) throw new RangeError(`sigmaPx must be a finite number > 0, received ${sigmaPx}`);
  const cached = kernels.get(sigmaPx);
  if (cached) return cached;
  const radius = Math.max(1, Math.ceil(3 * sigmaPx));
  const taps = new Float32Array(2 * radius + 1);
  let sum = 0;
  for (let i = -radius; i <= radius; i++) {
    const w = Math.exp((-0.5 * i * i) / (sigmaPx * sigmaPx));
    taps[i + radius] = w;
    sum += w;
  }
  for (let i = 0; i < taps.length; i++) taps[i] /= sum;
  kernels.set(sigmaPx, taps);
  return taps;
}

/**
 * Separable convolution of `src` (width × height) with `taps` along x then y, into `out`; cells
 * outside the grid count as 0. `scratch` holds the intermediate row pass (same length as src).
 */
export function convolveSeparable(src: Float32Array, out: Float32Array, scratch: Float32Array, width: number, height: number, taps: Float32Array): void {
  const radius = (taps.length - 1) >> 1;
  for (let y = 0; y < height; y++) {
    const row = y * width;
    for (let x = 0; x < width; x++) {
      const lo = Math.max(0, x - radius);
      const hi = Math.min(width - 1, x + radius);
      let s = 0;
      for (let k = lo; k <= hi; k++) s += taps[k - x + radius] * src[row + k];
      scratch[row + x] = s;
    }
  }
  for (let y = 0; y < height; y++) {
    const lo = Math.max(0, y - radius);
    const hi = Math.min(height - 1, y + radius);
    for (let x = 0; x < width; x++) {
      let s = 0;
      for (let k = lo; k <= hi; k++) s += taps[k - y + radius] * scratch[k * width + x];
      out[y * width + x] = s;
    }
  }
}

/**
 * Smooths `values` (NaN = hole) with a Gaussian of σ `sigmaPx` by normalised convolution. Returns
 * the smoothed values (NaN where the smoothed weight is below `minWeight`) and the weights.
 */
export function blurWithHoles(values: Float32Array, width: number, height: number, sigmaPx: number, minWeight = 0.25): { values: Float32Array; weight: Float32Array } {
  const n = width * height;
  const masked = new Float32Array(n);
  const mask = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (Number.isFinite(v)) {
      masked[i] = v;
      mask[i] = 1;
    }
  }
  const taps = gaussianKernel(sigmaPx);
  const scratch = new Float32Array(n);
  const num = new Float32Array(n);
  const weight = new Float32Array(n);
  convolveSeparable(masked, num, scratch, width, height, taps);
  convolveSeparable(mask, weight, scratch, width, height, taps);
  const out = new Float32Array(n);
  for (let i = 0; i < n; i++) out[i] = weight[i] >= minWeight ? num[i] / weight[i] : NaN;
  return { values: out, weight };
}
