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
 *
 * `response`: the camera's response (picture style, ../colour/toneResponse.ts) applied after the
 * encode, fitted with weak priors toward the identity (contrast 0 ± 0.4, ln γ 0 ± 0.2, saturation
 * 1 ± 0.25, as in the photo fit). A tone curve and a saturation need colours spread over dark, mid
 * and bright values: it is fitted only for an sRGB camera with at least MIN_RESPONSE_THICKNESSES
 * known thicknesses and observations to spare, and otherwise held at the identity (the record
 * says so in `response_note`).
 */
import { balanceTable, decodeSrgb, encodeSrgb, filmColourTable, type Camera } from '../colour/index.js';
import { applyResponse, CONTRAST_RANGE, GAMMA_RANGE, IDENTITY_RESPONSE, SATURATION_RANGE } from '../colour/toneResponse.js';
import { fitLeastSquares } from '../fit/fitLeastSquares.js';
import type { Stack } from '../optics/types.js';
import type { ExposureParameters } from '../map/types.js';
import type { KnownRegionColour } from './knownRegions.js';

export type CalibrationParameter = 'exposure' | 'flare' | 'white-balance' | 'index' | 'angle' | 'response';
export const CALIBRATION_PARAMETERS: readonly CalibrationParameter[] = ['exposure', 'flare', 'white-balance', 'index', 'angle', 'response'];
/** Fewest known thicknesses from which the camera's response is fitted (a judgement: dark, mid, bright and one to check). */
export const MIN_RESPONSE_THICKNESSES = 4;

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
  /** Why the response asked for was held at the identity (null when fitted or not asked for). */
  readonly responseNote: string | null;
}

/** Slots of the full parameter vector. */
const SLOTS = ['exposure', 'wbR', 'wbB', 'flareR', 'flareG', 'flareB', 'indexScale', 'angleDeg', 'contrast', 'gamma', 'saturation'] as const;
/** Slots each --fit name stands for. */
const PARAMETER_SLOTS: Record<CalibrationParameter, readonly number[]> = { exposure: [0], 'white-balance': [1, 2], flare: [3, 4, 5], index: [6], angle: [7], response: [8, 9, 10] };
/** Weak priors of the response toward the identity: [slot, centre, sigma, on the log?]. */
const RESPONSE_PRIORS: ReadonlyArray<readonly [number, number, number, boolean]> = [
  [8, 0, 0.4, false],
  [9, 0, 0.2, true],
  [10, 1, 0.25, false],
];

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
  let responseNote: string | null = null;
  if (wanted.has('response')) {
    const thicknesses = new Set(regions.map((r) => r.thicknessNm)).size;
    if (camera.encoding !== 'srgb') responseNote = 'a linear camera has no picture style: response held at the identity';
    else if (thicknesses < MIN_RESPONSE_THICKNESSES) {
      responseNote = `${thicknesses} known thickness(es): fewer than ${MIN_RESPONSE_THICKNESSES}, too few to fit the camera's picture style; response held at the identity`;
    } else if (active.length + 3 >= observations) {
      responseNote = `${regions.length} known region(s) give ${observations} colour values: too few to fit the camera's picture style as well; response held at the identity`;
    } else active.push(8, 9, 10);
  }
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
  const full = [1, 1, 1, 0, 0, 0, 1, (input.angleRad * 180) / Math.PI, IDENTITY_RESPONSE.contrast, IDENTITY_RESPONSE.gamma, IDENTITY_RESPONSE.saturation];
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
  const lowerFull = [full[0] * 0.02, 0.25, 0.25, -0.05, -0.05, -0.05, 0.8, 0, CONTRAST_RANGE[0], GAMMA_RANGE[0], SATURATION_RANGE[0]];
  const upperFull = [full[0] * 50, 4, 4, 0.5, 0.5, 0.5, 1.25, 80, CONTRAST_RANGE[1], GAMMA_RANGE[1], SATURATION_RANGE[1]];
  const scaleFull = [full[0], 1, 1, 0.05, 0.05, 0.05, 0.05, 10, 0.1, 0.1, 0.1];
  const responseFitted = active.includes(8);
  // Prior rows (weight 1, value (p − centre)/σ) follow the observations when the response is fitted.
  const rows = observations + (responseFitted ? RESPONSE_PRIORS.length : 0);
  const y = new Float64Array(rows);
  const weights = new Float64Array(rows).fill(1);
  regions.forEach((r, k) => {
    for (let c = 0; c < 3; c++) {
      y[k * 3 + c] = r.colour[c];
      // Model error floor of half a code value keeps perfect synthetic data well-posed.
      const sigma = Math.hypot(r.standardError[c], 0.5 / 255);
      weights[k * 3 + c] = 1 / (sigma * sigma);
    }
  });
  // The priors weigh as in the photo fit (../map/fitPhotoFormation.ts): a deviation of one prior
  // sigma costs as much as a third of all the colour values at their own uncertainty.
  // (weights 1/σ² make each colour value's residual count 1 at its uncertainty; a prior row's
  // residual is (p − centre)/σ_prior).
  for (let j = observations; j < rows; j++) weights[j] = observations / 3;
  const x = Float64Array.from({ length: rows }, (_, i) => i);
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
    const out = new Float64Array(rows);
    for (let k = 0; k < regions.length; k++) {
      for (let c = 0; c < 3; c++) {
        const value = Math.min(1, Math.max(0, balanced[k * 3 + c] + v[3 + c]));
        out[k * 3 + c] = camera.encoding === 'linear' ? value : encodeSrgb(value);
      }
    }
    if (camera.encoding === 'srgb') applyResponse(out, regions.length, { contrast: v[8], gamma: v[9], saturation: v[10] });
    if (responseFitted) {
      RESPONSE_PRIORS.forEach(([slot, centre, sigma, log], j) => (out[observations + j] = ((log ? Math.log(v[slot]) : v[slot]) - centre) / sigma));
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
      // The response's parameters sit near 0 or 1 by nature: judged by an absolute uncertainty.
      const loose = slot >= 8 ? se > 0.15 : se > Math.abs(v[slot]) * 0.5 + (slot >= 3 && slot <= 5 ? 0.05 : 0);
      if (!Number.isFinite(se) || loose) {
        warnings.push(`the known regions cannot constrain ${SLOTS[slot]} (uncertainty ${Number.isFinite(se) ? se.toPrecision(2) : 'undefined'}): add regions of other thicknesses, or fix it`);
      }
    });
  } else uncertainties = {};
  const predicted = predict(v).subarray(0, observations);
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
      response: responseFitted ? { contrast: v[8], gamma: v[9], saturation: v[10] } : null,
      responseSource: responseFitted ? 'calibration' : 'identity',
    },
    uncertainties,
    predicted: regions.map((_, k) => [predicted[k * 3], predicted[k * 3 + 1], predicted[k * 3 + 2]]),
    rmsResidual: rms,
    // Only what was really fitted: parameters dropped for too few regions are left out.
    fitted: input.fit.filter((name) => PARAMETER_SLOTS[name].every((slot) => active.includes(slot))),
    warnings: [...new Set(warnings)],
    responseNote,
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

