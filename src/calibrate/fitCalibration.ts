/**
 * Calibration fit: photo-formation parameters (and optionally the film index scale and the
 * angle of incidence) from rectangles of known film thickness, by Levenberg–Marquardt
 * (`src/fit`). Model per known region and channel c:
 *
 *   encoded_c = encode( exposure · (W(wb) · rgbLinear(d_known; indexScale, angle))_c + flare_c )
 *
 * with W(wb) the white-balance gains on the camera's channels (../colour/exposureModel.ts) and
 * the middle gain ≡ 1 (exposure absorbs it). Parameters are scaled to about 1 (exposure by its start,
 * flare by 0.05) and bounded. Standard uncertainties come from the Jacobian at the optimum
 * (cov = s²(JᵀWJ)⁻¹). Parameters the data cannot constrain are reported as warnings.
 */
import { balanceTable, decodeSrgb, encodeSrgb, filmColourTable, type Camera } from '../colour/index.js';
import { fitLeastSquares } from '../fit/fitLeastSquares.js';
import type { Stack } from '../optics/types.js';
import type { ExposureParameters } from '../map/types.js';
import type { KnownRegionColour } from './knownRegions.js';

export type CalibrationParameter = 'exposure' | 'flare' | 'white-balance' | 'index' | 'angle';
export const CALIBRATION_PARAMETERS: readonly CalibrationParameter[] = ['exposure', 'flare', 'white-balance', 'index', 'angle'];

export interface CalibrationFitInput {
  readonly stack: Stack;
  readonly camera: Camera;
  readonly angleRad: number;
  readonly regions: readonly KnownRegionColour[];
  readonly fit: readonly CalibrationParameter[];
}

export interface CalibrationFitResult {
  readonly parameters: ExposureParameters & { readonly filmIndexScale: number; readonly angleDeg: number };
  readonly uncertainties: Record<string, number | null>;
  /** Predicted encoded colour per region at the optimum. */
  readonly predicted: Array<[number, number, number]>;
  readonly rmsResidual: number;
  readonly fitted: CalibrationParameter[];
  readonly warnings: string[];
}

/** Slots of the full parameter vector. */
const SLOTS = ['exposure', 'wbR', 'wbB', 'flareR', 'flareG', 'flareB', 'indexScale', 'angleDeg'] as const;
/** Slots each --fit name stands for. */
const PARAMETER_SLOTS: Record<CalibrationParameter, readonly number[]> = { exposure: [0], 'white-balance': [1, 2], flare: [3, 4, 5], index: [6], angle: [7] };

export function fitCalibration(input: CalibrationFitInput): CalibrationFitResult {
  const { stack, camera, regions } = input;
  const warnings: string[] = [];
  const wanted = new Set(input.fit);
  if (!wanted.has('exposure')) warnings.push('exposure not fitted: held at 1');
  const observations = regions.length * 3;
  let active: number[] = [];
  if (wanted.has('exposure')) active.push(0);
  if (wanted.has('white-balance')) active.push(1, 2);
  if (wanted.has('flare')) active.push(3, 4, 5);
  if (wanted.has('index')) active.push(6);
  if (wanted.has('angle')) active.push(7);
  // Too few observations: drop what cannot be constrained, most specific first.
  const dropOrder: Array<[number[], string]> = [
    [[7], 'angle'],
    [[6], 'film index'],
    [[3, 4, 5], 'flare'],
    [[1, 2], 'white balance'],
  ];
  for (const [slots, name] of dropOrder) {
    if (active.length < observations) break;
    if (!slots.every((s) => active.includes(s))) continue;
    active = active.filter((s) => !slots.includes(s));
    warnings.push(`${regions.length} known region(s) give ${observations} colour values: too few to fit the ${name} as well; held at its default`);
  }
  const distinct = new Set(regions.map((r) => r.thicknessNm)).size;
  if (active.includes(6) && distinct < 2) {
    warnings.push('film index and thickness trade off with only one known thickness: the index scale is poorly constrained (give known regions of different thickness)');
  }
  for (const r of regions) {
    if (r.clippedFraction > 0.02) {
      warnings.push(`known region ${r.region.join(',')}=${r.thicknessNm} nm has ${(100 * r.clippedFraction).toFixed(1)} % clipped (saturated or black) pixels: its colour is not reliable`);
    }
  }
  const full = [1, 1, 1, 0, 0, 0, 1, (input.angleRad * 180) / Math.PI];
  // Start the exposure from the brightest region's ratio of observed to modelled luminance.
  const base = regionColoursLinear(stack, camera, regions, 1, full[7]);
  let ratio = 0;
  let weight = 0;
  regions.forEach((r, k) => {
    const observed = decodeSrgb(r.colour[1]);
    if (base[k * 3 + 1] > 1e-4) {
      ratio += observed;
      weight += base[k * 3 + 1];
    }
  });
  // Only when the exposure is fitted: otherwise it is held at 1, as the warning above says.
  if (active.includes(0) && weight > 0 && ratio > 0) full[0] = ratio / weight;
  const lowerFull = [full[0] * 0.02, 0.25, 0.25, -0.05, -0.05, -0.05, 0.8, 0];
  const upperFull = [full[0] * 50, 4, 4, 0.5, 0.5, 0.5, 1.25, 80];
  const scaleFull = [full[0], 1, 1, 0.05, 0.05, 0.05, 0.05, 10];
  const y = new Float64Array(observations);
  const weights = new Float64Array(observations);
  regions.forEach((r, k) => {
    for (let c = 0; c < 3; c++) {
      y[k * 3 + c] = r.colour[c];
      // Model error floor of half a code value keeps perfect synthetic data well-posed.
      const sigma = Math.hypot(r.standardError[c], 0.5 / 255);
      weights[k * 3 + c] = 1 / (sigma * sigma);
    }
  });
  const x = Float64Array.from({ length: observations }, (_, i) => i);
  const expand = (p: readonly number[]): number[] => {
    const v = full.slice();
    active.forEach((slot, j) => (v[slot] = p[j]));
    return v;
  };
  let cacheKey = '';
  let cache = new Float64Array(observations);
  const predict = (v: readonly number[]): Float64Array => {
    const key = v.join(',');
    if (key === cacheKey) return cache;
    const linear = regionColoursLinear(stack, camera, regions, v[6], v[7]);
    const balanced = balanceTable(linear, { exposure: v[0], whiteBalance: [v[1], 1, v[2]], flare: [0, 0, 0] }, camera.encoding);
    const out = new Float64Array(observations);
    for (let k = 0; k < regions.length; k++) {
      for (let c = 0; c < 3; c++) {
        const value = Math.min(1, Math.max(0, balanced[k * 3 + c] + v[3 + c]));
        out[k * 3 + c] = camera.encoding === 'linear' ? value : encodeSrgb(value);
      }
    }
    cacheKey = key;
    cache = out;
    return out;
  };
  let v = full.slice();
  let uncertainties: Record<string, number | null> = {};
  let rms = 0;
  if (active.length > 0) {
    const result = fitLeastSquares({
      x,
      y,
      weights,
      model: (p) => {
        const values = predict(expand(p));
        return (i) => values[i];
      },
      initial: active.map((s) => full[s]),
      lower: active.map((s) => lowerFull[s]),
      upper: active.map((s) => upperFull[s]),
      scale: active.map((s) => scaleFull[s]),
      maxIterations: 200,
      tolerance: 1e-12,
    });
    v = expand(result.parameters);
    // The fitting layer numbers parameters from 0 in the active list; name them instead.
    warnings.push(...result.warnings.map((w) => w.replace(/\bparameter (\d+)/g, (_, j: string) => SLOTS[active[Number(j)]] ?? `parameter ${j}`)));
    active.forEach((slot, j) => {
      const se = result.standardErrors[j];
      uncertainties[SLOTS[slot]] = Number.isFinite(se) ? se : null;
      if (!Number.isFinite(se) || se > Math.abs(v[slot]) * 0.5 + (slot >= 3 && slot <= 5 ? 0.05 : 0)) {
        warnings.push(`the known regions cannot constrain ${SLOTS[slot]} (uncertainty ${Number.isFinite(se) ? se.toPrecision(2) : 'undefined'}): add regions of other thicknesses, or fix it`);
      }
    });
  } else uncertainties = {};
  const predicted = predict(v);
  let sum = 0;
  for (let i = 0; i < observations; i++) sum += (predicted[i] - y[i]) ** 2;
  rms = Math.sqrt(sum / observations);
  return {
    parameters: {
      exposure: v[0],
      whiteBalance: [v[1], 1, v[2]],
      flare: [v[3], v[4], v[5]],
      filmIndexScale: v[6],
      angleDeg: v[7],
    },
    uncertainties,
    predicted: regions.map((_, k) => [predicted[k * 3], predicted[k * 3 + 1], predicted[k * 3 + 2]]),
    rmsResidual: rms,
    // Only what was really fitted: parameters dropped for too few regions are left out.
    fitted: input.fit.filter((name) => PARAMETER_SLOTS[name].every((slot) => active.includes(slot))),
    warnings: [...new Set(warnings)],
  };
}

/** Linear camera RGB of each region's known thickness (regions × 3). */
function regionColoursLinear(
  stack: Stack,
  camera: Camera,
  regions: readonly KnownRegionColour[],
  filmIndexScale: number,
  angleDeg: number,
): Float64Array {
  const thicknessesNm = Float64Array.from(regions.map((r) => r.thicknessNm));
  return filmColourTable(stack, camera, thicknessesNm, (angleDeg * Math.PI) / 180, 'mixed', filmIndexScale);
}

