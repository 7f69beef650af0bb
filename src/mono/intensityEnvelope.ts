/**
 * Local intensity of the brightest (or darkest) fringe across the photo, for uneven lighting.
 *
 * Vignetting and an off-axis lamp change the light smoothly over the frame; the cos⁴ fall-off of
 * a lens is close to a quadratic in the image coordinates over usual fields (common practice). So
 * the intensities at the bright (dark) fringe pixels are fitted by least squares with a quadratic
 * surface a + b·x + c·y + d·x² + e·x·y + f·y² in coordinates scaled to [−1, 1], with two rounds
 * of rejecting samples more than 3 robust standard deviations off. The surface is reduced to a
 * plane, or to the median, when the samples do not spread over enough of the frame to pin the
 * curvature (our rule: half the width and height for a quadratic, a quarter for a plane), and its
 * values are kept within the range of the samples ± 10 % so it never runs away outside them.
 */

function solve(matrix: Float64Array, rhs: Float64Array, size: number): Float64Array | null {
  const a = Float64Array.from(matrix);
  const b = Float64Array.from(rhs);
  for (let col = 0; col < size; col++) {
    let pivot = col;
    for (let r = col + 1; r < size; r++) if (Math.abs(a[r * size + col]) > Math.abs(a[pivot * size + col])) pivot = r;
    if (Math.abs(a[pivot * size + col]) < 1e-12) return null;
    if (pivot !== col) {
      for (let c = 0; c < size; c++) [a[col * size + c], a[pivot * size + c]] = [a[pivot * size + c], a[col * size + c]];
      [b[col], b[pivot]] = [b[pivot], b[col]];
    }
    for (let r = col + 1; r < size; r++) {
      const f = a[r * size + col] / a[col * size + col];
      for (let c = col; c < size; c++) a[r * size + c] -= f * a[col * size + c];
      b[r] -= f * b[col];
    }
  }
  const x = new Float64Array(size);
  for (let r = size - 1; r >= 0; r--) {
    let s = b[r];
    for (let c = r + 1; c < size; c++) s -= a[r * size + c] * x[c];
    x[r] = s / a[r * size + r];
  }
  return x;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** Per-pixel envelope from fringe pixels `samples` (pixel indices) of `intensity`. */
export function intensityEnvelope(
  samples: Int32Array,
  intensity: Float32Array,
  width: number,
  height: number,
  fallback: number,
): Float32Array {
  const out = new Float32Array(width * height);
  if (samples.length < 8) return out.fill(fallback);
  const sx = width > 1 ? 2 / (width - 1) : 0;
  const sy = height > 1 ? 2 / (height - 1) : 0;
  const xs: number[] = [];
  const ys: number[] = [];
  const vs: number[] = [];
  // At most ~20 000 samples: plenty for six coefficients.
  const stride = Math.max(1, Math.floor(samples.length / 20000));
  for (let i = 0; i < samples.length; i += stride) {
    const p = samples[i];
    const x = p % width;
    xs.push(x * sx - 1);
    ys.push(((p - x) / width) * sy - 1);
    vs.push(intensity[p]);
  }
  let minX = Infinity;
  let maxX = -Infinity;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let i = 0; i < xs.length; i++) {
    minX = Math.min(minX, xs[i]);
    maxX = Math.max(maxX, xs[i]);
    minY = Math.min(minY, ys[i]);
    maxY = Math.max(maxY, ys[i]);
  }
  const spanX = (maxX - minX) / 2;
  const spanY = (maxY - minY) / 2;
  const size = spanX >= 0.5 && spanY >= 0.5 ? 6 : spanX >= 0.25 && spanY >= 0.25 ? 3 : 1;
  const basis = (x: number, y: number, k: number): number => [1, x, y, x * x, x * y, y * y][k];
  let keep = vs.map(() => true);
  let coef: Float64Array = Float64Array.of(median(vs), 0, 0, 0, 0, 0);
  for (let round = 0; round < 3; round++) {
    const m = new Float64Array(size * size);
    const r = new Float64Array(size);
    for (let i = 0; i < vs.length; i++) {
      if (!keep[i]) continue;
      for (let j = 0; j < size; j++) {
        const bj = basis(xs[i], ys[i], j);
        r[j] += bj * vs[i];
        for (let k = 0; k < size; k++) m[j * size + k] += bj * basis(xs[i], ys[i], k);
      }
    }
    const solved = solve(m, r, size);
    if (solved === null) break;
    coef = Float64Array.from({ length: 6 }, (_, k) => (k < size ? solved[k] : 0));
    const residuals = vs.map((v, i) => Math.abs(v - [0, 1, 2, 3, 4, 5].reduce((s, k) => s + coef[k] * basis(xs[i], ys[i], k), 0)));
    const limit = 3 * 1.4826 * median(residuals) + 1e-9;
    keep = residuals.map((res) => res <= limit);
  }
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < vs.length; i++) {
    if (!keep[i]) continue;
    lo = Math.min(lo, vs[i]);
    hi = Math.max(hi, vs[i]);
  }
  const margin = 0.1 * Math.max(hi - lo, Math.abs(hi));
  for (let y = 0; y < height; y++) {
    const v = y * sy - 1;
    for (let x = 0; x < width; x++) {
      const u = x * sx - 1;
      const value = coef[0] + coef[1] * u + coef[2] * v + coef[3] * u * u + coef[4] * u * v + coef[5] * v * v;
      out[y * width + x] = Math.min(hi + margin, Math.max(lo - margin, value));
    }
  }
  return out;
}
