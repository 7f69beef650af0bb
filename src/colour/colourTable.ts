/**
 * Linear RGB (or XYZ) of many spectra at once: out[t*3 + c] = Σ_j weights[c*n + j] · R[t*n + j].
 * This is the inner product behind every colour lookup; spectra are laid out
 * `[thicknessIndex * nWavelengths + wavelengthIndex]` as the optics engine returns them.
 */

export function applyWeightsToSpectra(weights: Float64Array, spectra: Float64Array, out?: Float64Array): Float64Array {
  const n = weights.length / 3;
  if (!Number.isInteger(n) || n === 0) throw new RangeError(`weights length must be a positive multiple of 3, received ${weights.length}`);
  if (spectra.length % n !== 0) {
    throw new RangeError(`spectra length must be a multiple of the ${n} wavelengths of the weights, received ${spectra.length}`);
  }
  const count = spectra.length / n;
  const result = out ?? new Float64Array(count * 3);
  if (result.length < count * 3) throw new RangeError(`out must hold ${count * 3} values, received ${result.length}`);
  for (let t = 0; t < count; t++) {
    const base = t * n;
    let a = 0;
    let b = 0;
    let c = 0;
    for (let j = 0; j < n; j++) {
      const r = spectra[base + j];
      a += weights[j] * r;
      b += weights[n + j] * r;
      c += weights[2 * n + j] * r;
    }
    result[t * 3] = a;
    result[t * 3 + 1] = b;
    result[t * 3 + 2] = c;
  }
  return result;
}
