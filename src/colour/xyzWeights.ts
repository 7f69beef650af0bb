/**
 * Tristimulus integration as a weight matrix: X = Σ_j w_X[j] · R(λ_j), likewise Y and Z, with
 * w = k · S(λ) · {x̄, ȳ, z̄}(λ) · Δλ and k = 100 / Σ S ȳ Δλ, so a perfect white reflector has
 * Y = 100 under the light (CIE 15:2004 §7.1–7.2, summation at the grid interval).
 * For a line light the grid is the line's single wavelength.
 */
import { type Light, lightOnGrid } from './light.js';
import { type ObserverName, colourMatchingFunctionsOn } from './observers.js';
import { DEFAULT_GRID, type GridSpec, intervalWeightsNm, spectralGrid } from './spectralGrid.js';

/** The wavelengths a light is integrated on: its line, or the common grid (default 380–780 nm, 1 nm). */
export function integrationGrid(light: Light, spec: GridSpec = DEFAULT_GRID): Float64Array {
  if (light.kind === 'line') return Float64Array.of(light.lineNm as number);
  return spectralGrid(spec);
}

/** 3 × N row-major weights for X, Y, Z (Y of a perfect white = 100) on `gridNm`. */
export function xyzWeights(light: Light, observer: ObserverName = '1931', gridNm: Float64Array = integrationGrid(light)): Float64Array {
  const n = gridNm.length;
  const spd = lightOnGrid(light, gridNm);
  const cmf = colourMatchingFunctionsOn(gridNm, observer);
  const dl = intervalWeightsNm(gridNm);
  let ySum = 0;
  for (let j = 0; j < n; j++) ySum += spd[j] * cmf.yBar[j] * dl[j];
  if (!(ySum > 0)) {
    throw new RangeError(`light ${light.name} gives no luminance on the grid ${gridNm[0]}–${gridNm[n - 1]} nm; expected some power where the observer is sensitive`);
  }
  const k = 100 / ySum;
  const w = new Float64Array(3 * n);
  for (let j = 0; j < n; j++) {
    const s = k * spd[j] * dl[j];
    w[j] = s * cmf.xBar[j];
    w[n + j] = s * cmf.yBar[j];
    w[2 * n + j] = s * cmf.zBar[j];
  }
  return w;
}

/** Applies 3 × N weights to one spectrum: out = W · spectrum. */
export function applyWeights(weights: Float64Array, spectrum: ArrayLike<number>, offset = 0): [number, number, number] {
  const n = weights.length / 3;
  let a = 0;
  let b = 0;
  let c = 0;
  for (let j = 0; j < n; j++) {
    const r = spectrum[offset + j];
    a += weights[j] * r;
    b += weights[n + j] * r;
    c += weights[2 * n + j] * r;
  }
  return [a, b, c];
}

/** XYZ of the perfect white reflector under the light (Y = 100), the light's white point. */
export function whitePointXyz(light: Light, observer: ObserverName = '1931', spec: GridSpec = DEFAULT_GRID): [number, number, number] {
  const w = xyzWeights(light, observer, integrationGrid(light, spec));
  const n = w.length / 3;
  let x = 0;
  let y = 0;
  let z = 0;
  for (let j = 0; j < n; j++) {
    x += w[j];
    y += w[n + j];
    z += w[2 * n + j];
  }
  return [x, y, z];
}
