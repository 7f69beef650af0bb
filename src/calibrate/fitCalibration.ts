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
 * Uneven light (a fixed inspection station's lamp falling off across the stage): when the photo
 * size is given and the known regions are spread over the photo, the exposure becomes a field,
 * exposure·exp(Σ c_k·b_k(u, v)) at each region's centre, on the basis of
 * ../map/lightEvenness.ts without its constant (the exposure is the gain at the photo's centre):
 * with the regions spread over at least half the photo's width and height, the quadratic with the
 * radial r⁴ term of vignetting (u, v, u², uv, v², r⁴) from 12 regions, the quadratic from 8, else
 * the plane (u, v) from 4. A field whose coefficients the regions
 * cannot pin down (standard uncertainty above `FIELD_SE_MAX`) falls back to the plane, then to one
 * exposure. Each region's colour is its median, so the field is taken at its centre.
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
/** What a calibration fits unless told otherwise (`lamella calibrate --fit`, `--known` on a map, the library's `calibrate`). */
export const DEFAULT_CALIBRATION_FIT: readonly CalibrationParameter[] = ['exposure', 'flare', 'white-balance', 'response'];
/** Fewest known thicknesses from which the camera's response is fitted (a judgement: dark, mid, bright and one to check). */
export const MIN_RESPONSE_THICKNESSES = 4;

export interface CalibrationFitInput {
  readonly stack: Stack;
  readonly camera: Camera;
  readonly angleRad: number;
  readonly regions: readonly KnownRegionColour[];
  readonly fit: readonly CalibrationParameter[];
  /** The photo's size: needed to fit a light field (region centres in the field's coordinates). */
  readonly photoSize?: { readonly width: number; readonly height: number } | null;
  /** `auto` (default): fit a light field when the regions are spread enough; `off`: one exposure. */
  readonly lightField?: 'auto' | 'off';
}

/** A light field fitted on the known regions (coefficients on the basis of ../map/lightEvenness.ts). */
export interface CalibrationField {
  /** log relative gain coefficients (1, u, v, u², uv, v², r⁴); the constant is 0 (gain 1 at the centre). */
  readonly logGainCoefficients: number[];
  /** Standard uncertainties of the coefficients (0 for the terms not fitted). */
  readonly standardErrors: number[];
  /** Which terms were fitted besides the constant (see TIER_TERMS). */
  readonly tier: FieldTier;
}

export interface CalibrationFitResult {
  readonly parameters: ExposureParameters & { readonly filmIndexScale: number; readonly angleDeg: number };
  readonly uncertainties: Record<string, number | null>;
  /** Predicted encoded colour per region at the optimum. */
  readonly predicted: Array<[number, number, number]>;
  readonly rmsResidual: number;
  readonly fitted: CalibrationParameter[];
  readonly warnings: string[];
  /** The light field, or null with `fieldNote` saying why none was fitted. */
  readonly field: CalibrationField | null;
  readonly fieldNote: string;
  /** Why the response asked for was held at the identity (null when fitted or not asked for). */
  readonly responseNote: string | null;
}

/** Largest standard uncertainty of a field coefficient that is kept (3 % of gain at the photo's edge). */
export const FIELD_SE_MAX = 0.03;
/** Regions needed for a plane and a quadratic field, and their spread (share of width and height). */
const FIELD_PLANE_REGIONS = 4;
const FIELD_QUADRATIC_REGIONS = 8;
const FIELD_RADIAL_REGIONS = 12;
const FIELD_SPREAD = 0.5;

/** Slots of the full parameter vector. */
const SLOTS = [
  'exposure',
  'wbR',
  'wbB',
  'flareR',
  'flareG',
  'flareB',
  'indexScale',
  'angleDeg',
  'field u',
  'field v',
  'field u²',
  'field uv',
  'field v²',
  'field r⁴',
  'contrast',
  'gamma',
  'saturation',
] as const;
const FIELD_SLOTS = [8, 9, 10, 11, 12, 13];
const RESPONSE_SLOTS = [14, 15, 16];
/** Weak priors of the response toward the identity: [slot, centre, sigma, on the log?]. */
const RESPONSE_PRIORS: ReadonlyArray<readonly [number, number, number, boolean]> = [
  [14, 0, 0.4, false],
  [15, 0, 0.2, true],
  [16, 1, 0.25, false],
];
/** Field terms of each tier: a plane (u, v), a quadratic, a quadratic with the radial r⁴ of vignetting. */
const TIER_TERMS = { plane: 2, quadratic: 5, radial: 6 } as const;
type FieldTier = keyof typeof TIER_TERMS;
/** Slots each --fit name stands for. */
const PARAMETER_SLOTS: Record<CalibrationParameter, readonly number[]> = { exposure: [0], 'white-balance': [1, 2], flare: [3, 4, 5], index: [6], angle: [7], response: RESPONSE_SLOTS };

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
    } else if (active.length + 3 >= regions.length * 3) {
      responseNote = `${regions.length} known region(s) give ${regions.length * 3} colour values: too few to fit the camera's picture style as well; response held at the identity`;
    } else active.push(...RESPONSE_SLOTS);
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
  const full = [1, 1, 1, 0, 0, 0, 1, (input.angleRad * 180) / Math.PI, 0, 0, 0, 0, 0, 0, IDENTITY_RESPONSE.contrast, IDENTITY_RESPONSE.gamma, IDENTITY_RESPONSE.saturation];
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
  const lowerFull = [full[0] * 0.02, 0.25, 0.25, -0.05, -0.05, -0.05, 0.8, 0, -2, -2, -2, -2, -2, -2, CONTRAST_RANGE[0], GAMMA_RANGE[0], SATURATION_RANGE[0]];
  const upperFull = [full[0] * 50, 4, 4, 0.5, 0.5, 0.5, 1.25, 80, 2, 2, 2, 2, 2, 2, CONTRAST_RANGE[1], GAMMA_RANGE[1], SATURATION_RANGE[1]];
  const scaleFull = [full[0], 1, 1, 0.05, 0.05, 0.05, 0.05, 10, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1];
  const responseFitted = active.includes(RESPONSE_SLOTS[0]);
  // Prior rows (value (p − centre)/σ) follow the observations when the response is fitted.
  const rows = observations + (responseFitted ? RESPONSE_PRIORS.length : 0);
  const y = new Float64Array(rows);
  const weights = new Float64Array(rows);
  regions.forEach((r, k) => {
    for (let c = 0; c < 3; c++) {
      y[k * 3 + c] = r.colour[c];
      // Model error floor of half a code value keeps perfect synthetic data well-posed.
      const sigma = Math.hypot(r.standardError[c], 0.5 / 255);
      weights[k * 3 + c] = 1 / (sigma * sigma);
    }
  });
  // The priors weigh as in the photo fit (../map/fitPhotoFormation.ts): a deviation of one prior
  // sigma costs as much as a third of all the colour values at their own uncertainty (weights
  // 1/σ² make each colour value's residual count 1 at its uncertainty).
  for (let j = observations; j < rows; j++) weights[j] = observations / 3;
  const x = Float64Array.from({ length: rows }, (_, i) => i);
  // Basis of the field at each region's centre (u, v, u², uv, v², r⁴).
  const fieldBasis = input.photoSize ? regionFieldBasis(regions, input.photoSize.width, input.photoSize.height) : null;
  let linearKey = '';
  let linear = base;
  const predictFor = (v: readonly number[]): Float64Array => {
    const key = `${v[6]},${v[7]}`;
    if (key !== linearKey) {
      linear = regionColoursLinear(stack, camera, regions, v[6], v[7]);
      linearKey = key;
    }
    const balanced = balanceTable(linear, { exposure: v[0], whiteBalance: [v[1], 1, v[2]], flare: [0, 0, 0] }, camera.encoding);
    const out = new Float64Array(rows);
    for (let k = 0; k < regions.length; k++) {
      let logGain = 0;
      if (fieldBasis) for (let j = 0; j < 6; j++) logGain += v[8 + j] * fieldBasis[k * 6 + j];
      const gain = Math.exp(logGain);
      for (let c = 0; c < 3; c++) {
        const value = Math.min(1, Math.max(0, gain * balanced[k * 3 + c] + v[3 + c]));
        out[k * 3 + c] = camera.encoding === 'linear' ? value : encodeSrgb(value);
      }
    }
    if (camera.encoding === 'srgb') applyResponse(out, regions.length, { contrast: v[14], gamma: v[15], saturation: v[16] });
    if (responseFitted) {
      RESPONSE_PRIORS.forEach(([slot, centre, sigma, log], j) => (out[observations + j] = ((log ? Math.log(v[slot]) : v[slot]) - centre) / sigma));
    }
    return out;
  };
  const solve = (slots: readonly number[]): { v: number[]; uncertainties: Record<string, number | null>; warnings: string[]; se: number[] } => {
    const expand = (p: readonly number[]): number[] => {
      const v = full.slice();
      slots.forEach((slot, j) => (v[slot] = p[j]));
      return v;
    };
    if (slots.length === 0) return { v: full.slice(), uncertainties: {}, warnings: [], se: full.map(() => 0) };
    const result = fitLeastSquares({
      x,
      y,
      weights,
      model: (p) => {
        const values = predictFor(expand(p));
        return (i) => values[i];
      },
      initial: slots.map((s) => full[s]),
      lower: slots.map((s) => lowerFull[s]),
      upper: slots.map((s) => upperFull[s]),
      scale: slots.map((s) => scaleFull[s]),
      maxIterations: 200,
      tolerance: 1e-12,
    });
    const v = expand(result.parameters);
    const fitWarnings: string[] = [];
    const uncertainties: Record<string, number | null> = {};
    const se = full.map(() => 0);
    // The fitting layer numbers parameters from 0 in the active list; name them instead.
    fitWarnings.push(...result.warnings.map((w) => w.replace(/\bparameter (\d+)/g, (_, j: string) => SLOTS[slots[Number(j)]] ?? `parameter ${j}`)));
    slots.forEach((slot, j) => {
      const error = result.standardErrors[j];
      se[slot] = Number.isFinite(error) ? error : Infinity;
      if (FIELD_SLOTS.includes(slot)) return;
      uncertainties[SLOTS[slot]] = Number.isFinite(error) ? error : null;
      // The response's parameters sit near 0 or 1 by nature: judged by an absolute uncertainty.
      const loose = RESPONSE_SLOTS.includes(slot) ? error > 0.15 : error > Math.abs(v[slot]) * 0.5 + (slot >= 3 && slot <= 5 ? 0.05 : 0);
      if (!Number.isFinite(error) || loose) {
        fitWarnings.push(`the known regions cannot constrain ${SLOTS[slot]} (uncertainty ${Number.isFinite(error) ? error.toPrecision(2) : 'undefined'}): add regions of other thicknesses, or fix it`);
      }
    });
    return { v, uncertainties, warnings: fitWarnings, se };
  };
  // The richest light field the regions pin down, else one exposure.
  const fieldChoice = chooseFieldTerms(input, regions, fieldBasis, active, observations);
  let fieldNote = fieldChoice.note;
  let solved = solve(active);
  let field: CalibrationField | null = null;
  for (const tier of fieldChoice.tiers) {
    const fieldSlots = FIELD_SLOTS.slice(0, TIER_TERMS[tier]);
    const withField = solve([...active, ...fieldSlots]);
    const worst = Math.max(...fieldSlots.map((slot) => withField.se[slot]));
    if (worst <= FIELD_SE_MAX) {
      solved = withField;
      field = {
        logGainCoefficients: [0, ...FIELD_SLOTS.map((slot) => withField.v[slot])],
        standardErrors: [0, ...FIELD_SLOTS.map((slot) => (fieldSlots.includes(slot) ? withField.se[slot] : 0))],
        tier,
      };
      fieldNote = `fitted on ${regions.length} known regions`;
      break;
    }
    fieldNote = `the known regions cannot pin down a ${tier} field (uncertainty ${Number.isFinite(worst) ? worst.toPrecision(2) : 'undefined'} above ${FIELD_SE_MAX}); one exposure used`;
  }
  const v = solved.v;
  warnings.push(...solved.warnings);
  const uncertainties = active.length > 0 ? solved.uncertainties : {};
  const predicted = predictFor(v).subarray(0, observations);
  let sum = 0;
  for (let i = 0; i < observations; i++) sum += (predicted[i] - y[i]) ** 2;
  const rms = Math.sqrt(sum / observations);
  return {
    parameters: {
      exposure: v[0],
      whiteBalance: [v[1], 1, v[2]],
      flare: [v[3], v[4], v[5]],
      filmIndexScale: v[6],
      angleDeg: v[7],
      response: responseFitted ? { contrast: v[14], gamma: v[15], saturation: v[16] } : null,
      responseSource: responseFitted ? 'calibration' : 'identity',
    },
    uncertainties,
    predicted: regions.map((_, k) => [predicted[k * 3], predicted[k * 3 + 1], predicted[k * 3 + 2]]),
    rmsResidual: rms,
    // Only what was really fitted: parameters dropped for too few regions are left out.
    fitted: input.fit.filter((name) => PARAMETER_SLOTS[name].every((slot) => active.includes(slot))),
    warnings: [...new Set(warnings)],
    field,
    fieldNote,
    responseNote,
  };
}

/**
 * Which light fields to try, richest first, and why none when none: the photo size must be known,
 * the exposure fitted, the regions many enough and spread over at least half the photo's width
 * and height, with observations to spare.
 */
function chooseFieldTerms(
  input: CalibrationFitInput,
  regions: readonly KnownRegionColour[],
  fieldBasis: Float64Array | null,
  active: readonly number[],
  observations: number,
): { tiers: FieldTier[]; note: string } {
  if (input.lightField === 'off') return { tiers: [], note: 'not fitted (light field off)' };
  if (!fieldBasis || !input.photoSize) return { tiers: [], note: 'not fitted (photo size unknown)' };
  if (!active.includes(0)) return { tiers: [], note: 'not fitted (the exposure is not fitted)' };
  const { width, height } = input.photoSize;
  const xs = regions.map((r) => r.region[0] + r.region[2] / 2);
  const ys = regions.map((r) => r.region[1] + r.region[3] / 2);
  const spreadX = (Math.max(...xs) - Math.min(...xs)) / width;
  const spreadY = (Math.max(...ys) - Math.min(...ys)) / height;
  const spread = `${Math.round(spreadX * 100)} % of the width and ${Math.round(spreadY * 100)} % of the height`;
  if (spreadX < FIELD_SPREAD || spreadY < FIELD_SPREAD) {
    return { tiers: [], note: `not fitted: the known regions span ${spread} (a field needs ${FIELD_SPREAD * 100} % of each); one exposure used` };
  }
  const tiers: FieldTier[] = [];
  if (regions.length >= FIELD_RADIAL_REGIONS && active.length + 6 < observations) tiers.push('radial');
  if (regions.length >= FIELD_QUADRATIC_REGIONS && active.length + 5 < observations) tiers.push('quadratic');
  if (regions.length >= FIELD_PLANE_REGIONS && active.length + 2 < observations) tiers.push('plane');
  if (tiers.length === 0) return { tiers, note: `not fitted: ${regions.length} known regions (a field needs ${FIELD_PLANE_REGIONS} or more spread over the photo); one exposure used` };
  return { tiers, note: '' };
}

/** u, v, u², uv, v², r⁴ of each region's centre (coordinates of ../map/lightEvenness.ts `relativeGainAt`). */
function regionFieldBasis(regions: readonly KnownRegionColour[], width: number, height: number): Float64Array {
  const out = new Float64Array(regions.length * 6);
  const half = Math.max(width, height) / 2;
  regions.forEach((r, k) => {
    const u = (r.region[0] + r.region[2] / 2 - width / 2) / half;
    const v = (r.region[1] + r.region[3] / 2 - height / 2) / half;
    out.set([u, v, u * u, u * v, v * v, (u * u + v * v) ** 2], k * 6);
  });
  return out;
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

