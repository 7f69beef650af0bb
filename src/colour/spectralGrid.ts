/**
 * The common wavelength grid on which spectra are integrated, and linear resampling onto it.
 * Grids are built as `fromNm + i * stepNm` (never a running sum). Default: 380–780 nm at 1 nm,
 * the range and interval CIE 15:2004 §7.1 recommends for colorimetric integration.
 */

export interface GridSpec {
  readonly fromNm: number;
  readonly toNm: number;
  readonly stepNm: number;
}

export const DEFAULT_GRID: GridSpec = { fromNm: 380, toNm: 780, stepNm: 1 };

/** Wavelengths fromNm, fromNm + stepNm, … ≤ toNm (toNm included when it falls on the grid). */
export function spectralGrid(spec: GridSpec = DEFAULT_GRID): Float64Array {
  const { fromNm, toNm, stepNm } = spec;
  if (!Number.isFinite(fromNm) || !Number.isFinite(toNm) || !(toNm > fromNm)) {
    throw new RangeError(`wavelength grid must have finite fromNm < toNm, received ${fromNm}..${toNm}`);
  }
  if (!Number.isFinite(stepNm) || !(stepNm > 0)) {
    throw new RangeError(`wavelength grid stepNm must be a finite number > 0, received ${stepNm}`);
  }
  const count = Math.floor((toNm - fromNm) / stepNm + 1e-9) + 1;
  const grid = new Float64Array(count);
  for (let i = 0; i < count; i++) grid[i] = fromNm + i * stepNm;
  return grid;
}

/**
 * Linear interpolation of a sampled function (`sourceNm` strictly increasing) at each point of
 * `targetNm`. Outside the sampled range the value is `outside` (default 0).
 */
export function resampleLinear(
  sourceNm: Float64Array,
  sourceValues: Float64Array,
  targetNm: Float64Array,
  outside = 0,
): Float64Array {
  const out = new Float64Array(targetNm.length);
  const last = sourceNm.length - 1;
  let k = 0;
  for (let i = 0; i < targetNm.length; i++) {
    const x = targetNm[i];
    if (x < sourceNm[0] || x > sourceNm[last]) {
      out[i] = outside;
      continue;
    }
    if (x < sourceNm[k]) k = 0;
    while (k < last - 1 && sourceNm[k + 1] <= x) k++;
    const x0 = sourceNm[k];
    const x1 = sourceNm[k + 1];
    const t = x1 === x0 ? 0 : (x - x0) / (x1 - x0);
    out[i] = sourceValues[k] + t * (sourceValues[k + 1] - sourceValues[k]);
  }
  return out;
}

/**
 * Summation weights for a grid: each sample stands for its own interval
 * (the CIE's summation rule, CIE 15:2004 §7.2: Σ S(λ) x̄(λ) Δλ). Uniform grids give stepNm
 * everywhere; non-uniform grids (a single line) give half the neighbouring gaps, or 1 for a
 * single sample.
 */
export function intervalWeightsNm(gridNm: Float64Array): Float64Array {
  const n = gridNm.length;
  const w = new Float64Array(n);
  if (n === 1) {
    w[0] = 1;
    return w;
  }
  for (let i = 0; i < n; i++) {
    const left = i > 0 ? gridNm[i] - gridNm[i - 1] : gridNm[1] - gridNm[0];
    const right = i < n - 1 ? gridNm[i + 1] - gridNm[i] : gridNm[n - 1] - gridNm[n - 2];
    w[i] = (left + right) / 2;
  }
  return w;
}
