/**
 * Fits the unknown photo-formation parameters (exposure gain, white-balance gains, flare) from
 * the photo itself, jointly with the thickness of a sample of pixels, by Levenberg–Marquardt
 * (Levenberg 1944, Marquardt 1963) through `src/fit`.
 *
 * Each pixel's thickness is a nuisance parameter: for given photo parameters it is the
 * minimiser of the colour distance, so it is projected out (variable projection, Golub &
 * Pereyra 1973): an outer loop assigns every sample its globally best thickness, an inner LM
 * fit moves the photo parameters while each sample follows its own local minimum (a downhill
 * walk from the assigned index, which keeps the residuals continuous in the parameters).
 * Samples whose residual is far above the median (colour mixtures at steep gradients, clipped
 * or foreign pixels) are trimmed between outer iterations. Weak priors hold the white-balance
 * gains near 1 (± 0.3) and the flare near 0 (± 0.05 of full scale), so that a photo with few
 * distinct colours cannot trade them freely against thickness; such a photo is also reported
 * (see `distinctColourCount`), since its parameters rest on those priors.
 *
 * The alternation can settle at more than one self-consistent answer (a shallow valley of flare,
 * white balance and tone curve): where it starts matters. A series frame (`ownFit`) therefore
 * starts from a rough cold fit of its own (a subsample, a coarser table) and is finished on all
 * samples from there, so it comes out the same whatever the previous frame was; `start` is only
 * tried when it explains the samples clearly better (`commonCost`).
 *
 * With `fitResponse` the camera's response (picture style, ../colour/toneResponse.ts: tone-curve
 * contrast and gamma, saturation about luma) is fitted in the same LM, with weak priors toward the
 * identity (contrast 0 ± 0.4, ln γ 0 ± 0.2, saturation 1 ± 0.25), so a clean photo stays near it.
 * The degeneracies are kept apart by the model's shapes over a photo of many colours: the
 * exposure scales linear light before the encode and clips, the gamma bends encoded values as a
 * power; flare lifts every channel's darkest linear level, the contrast darkens the shadows of all
 * colours alike and brightens the highlights; the white balance scales the camera's channels, the
 * saturation moves every colour away from its own luma along its own hue. The caller fits it only
 * on photos with enough distinct colours (mapPixels.ts, MIN_RESPONSE_COLOURS); without
 * `fitResponse` the start's response (a series' previous frame) is held, else the identity.
 */
import { selectKth } from './statistics.js';
import { fitLeastSquaresWithJacobian } from '../fit/fitLeastSquaresWithJacobian.js';
import { decodeSrgb } from '../colour/srgb.js';
import { type ColourTable, predictEncodedTable } from './colourTable.js';
import { type MatchSpace, toMatchSpace } from './matchSpace.js';
import { distanceAt } from './candidateCube.js';
import { refinePosition, walkDownhill } from './matchColour.js';
import type { ExposureParameters } from './types.js';
import { type NearestHit, buildNearestEntryIndex, nearestEntry } from './nearestEntry.js';
import { EntryDerivativeModel, PARAMETER_COUNT } from './predictionDerivatives.js';
import { CONTRAST_RANGE, GAMMA_RANGE, IDENTITY_RESPONSE, SATURATION_RANGE } from '../colour/toneResponse.js';

export interface PhotoFormationFit {
  readonly parameters: ExposureParameters;
  readonly standardErrors: {
    exposure: number;
    whiteBalance: [number, number, number];
    flare: [number, number, number];
    /** Standard errors of contrast, gamma and saturation (NaN when the response was not fitted). */
    response: [number, number, number];
  };
  /** Root-mean-square colour residual of the retained samples (encoded units). */
  readonly rmsResidual: number;
  readonly samplesUsed: number;
  readonly warnings: string[];
}

export interface PhotoFormationOptions {
  readonly table: ColourTable;
  /** n × 3 encoded colours of sample pixels. */
  readonly samples: Float32Array;
  readonly fitWhiteBalance: boolean;
  readonly fitFlare: boolean;
  /** Standard deviation of the photo's noise (encoded units), for the prior's weight. */
  readonly noiseSigma: number;
  /** Starting white balance (e.g. from a known camera setting); default 1,1,1. */
  readonly initialWhiteBalance?: readonly [number, number, number];
  /** Thickness-table indices to restrict the samples to (e.g. known regions); optional. */
  readonly fixedIndex?: Int32Array | null;
  /** Colour space of `samples` (see matchSpace.ts); null = encoded RGB. */
  readonly space?: MatchSpace | null;
  /** The same samples in encoded RGB (for the flare start); default `samples`. */
  readonly samplesRgb?: Float32Array;
  /**
   * Where to start instead of the flare estimate and the exposure scan: e.g. the previous frame's
   * parameters in a series, where the light and camera rarely change between frames.
   */
  readonly start?: ExposureParameters | null;
  /**
   * Fit the same way whatever `start` says (a series frame): a cold fit on a subsample first,
   * finished on all samples; `start` is used instead only when it explains the samples clearly
   * better (see `fitPhotoFormation`). Default false: start from `start`, else cold.
   */
  readonly ownFit?: boolean;
  /** A rough fit (the probe of `ownFit`): fewer iterations and a looser tolerance; it only has to find the right valley. */
  readonly rough?: boolean;
  /** Fit the camera's response (tone curve and saturation) too; default false. */
  readonly fitResponse?: boolean;
  /**
   * Told each inner least-squares problem before it is solved: its model (row values at the
   * active parameters), its Jacobian and its start (a check of the Jacobian for tests and
   * diagnostics; the map never sets it).
   */
  readonly onInnerProblem?: (problem: InnerProblem) => void;
}

/** One inner fit's least-squares problem (see PhotoFormationOptions.onInnerProblem). */
export interface InnerProblem {
  readonly evaluate: (parameters: readonly number[]) => Float64Array;
  readonly jacobian: (parameters: readonly number[], out: Float64Array) => void;
  readonly initial: readonly number[];
  readonly rows: number;
}

/** Predicted table in the matching space. */
function predictIn(space: MatchSpace | null | undefined, table: ColourTable, parameters: ExposureParameters, out: Float32Array): Float32Array {
  predictEncodedTable(table, parameters, out);
  return space ? toMatchSpace(space, out, out) : out;
}

const WHITE_BALANCE_PRIOR_SIGMA = 0.3;
/** Flare is veiling glare of a few per cent at most in a usable photo (common practice): prior 0 ± 0.05. */
const FLARE_PRIOR_SIGMA = 0.05;
const FLARE_START_MAX = 0.1;
const OUTER_ITERATIONS = 4;
/** Iterations and relative tolerance of a rough fit (judgements: the finish on all samples settles it). */
const ROUGH_ITERATIONS = 6;
const ROUGH_TOLERANCE = 1e-4;
/** Samples used by the coarse exposure scan. */
const SCAN_SAMPLES = 500;
const TRIM_FACTOR = 6;
/** Weak priors of the response toward the identity (judgements: wider than everyday styles' spread). */
const CONTRAST_PRIOR_SIGMA = 0.4;
const LOG_GAMMA_PRIOR_SIGMA = 0.2;
const SATURATION_PRIOR_SIGMA = 0.25;

export function fitPhotoFormation(options: PhotoFormationOptions): PhotoFormationFit {
  if (!options.ownFit) return fitFrom(options, options.start ?? coldStart(options, options.samples, options.samplesRgb ?? options.samples));
  // A series frame (see `ownFit`): the fit has more than one self-consistent answer on some
  // photos (flare, white balance and tone curve trade along a shallow valley, and samples change
  // thickness between outer iterations), so a fit started from the previous frame can settle where
  // the frame's own photo would not put it, and carry that along the series. The frame's own
  // answer is found by a cheap cold fit on a subsample (`coldProbe`) and finished on all samples.
  // The previous frame's parameters are tried only when, as they are, they already explain this
  // photo clearly better than the finished own answer (`commonCost`): the cold search missed.
  const probe = coldProbe(options);
  if (probe === null) return fitFrom(options, options.start ?? coldStart(options, options.samples, options.samplesRgb ?? options.samples));
  const own = fitFrom(options, probe, true);
  if (!options.start) return own;
  const ownCost = commonCost(options, own.parameters);
  if (!(commonCost(options, options.start) < ownCost * (1 - START_MARGIN))) return own;
  const carried = fitFrom(options, options.start, true);
  return commonCost(options, carried.parameters) < ownCost ? carried : own;
}

/** Every PROBE_STRIDE-th sample takes part in the cold probe of a series frame's fit. */
const PROBE_STRIDE = 4;
/**
 * The previous frame's parameters are tried only when their cost is lower than the own fit's by
 * more than this share (10 %, a judgement): neighbouring self-consistent answers of one photo
 * differ by a few per cent (8 % between the two on the demo's frame 6), a missed search by more.
 */
const START_MARGIN = 0.1;
/** Share of the samples (the best-fitting) the common cost sums over: a fixed share, so two parameter sets compare on equal terms. */
const COMMON_COST_SHARE = 0.9;

/** The cold start: the flare estimate and the exposure scan. */
function coldStart(options: PhotoFormationOptions, samples: Float32Array, samplesRgb: Float32Array): ExposureParameters {
  const initialFlare = estimateFlare(samplesRgb, options.table.encoding);
  const initialWb = options.initialWhiteBalance ?? [1, 1, 1];
  const exposure0 = scanExposure(options.table, samples, initialWb, initialFlare, options.space);
  return { exposure: exposure0, whiteBalance: [...initialWb], flare: initialFlare, response: null };
}

/** Every PROBE_TABLE_STRIDE-th thickness of the table for the probe (4 nm steps on the usual 1 nm table: colours change little over 4 nm, and positions are interpolated). */
const PROBE_TABLE_STRIDE = 4;

/** The table at every `stride`-th thickness (a copy). */
function coarserTable(table: ColourTable, stride: number): ColourTable {
  const count = Math.floor((table.count - 1) / stride) + 1;
  const rgbLinear = new Float64Array(count * 3);
  for (let i = 0; i < count; i++) for (let c = 0; c < 3; c++) rgbLinear[i * 3 + c] = table.rgbLinear[i * stride * 3 + c];
  return { startNm: table.startNm, stepNm: table.stepNm * stride, count, rgbLinear, encoding: table.encoding };
}

/**
 * The cold fit on every PROBE_STRIDE-th sample and every PROBE_TABLE_STRIDE-th thickness (anchored
 * samples keep their thickness, to the nearest coarse step); null when too few samples.
 */
function coldProbe(options: PhotoFormationOptions): ExposureParameters | null {
  const n = options.samples.length / 3;
  const m = Math.floor(n / PROBE_STRIDE);
  if (m < 50) return null;
  const samples = new Float32Array(m * 3);
  const samplesRgb = new Float32Array(m * 3);
  const rgb = options.samplesRgb ?? options.samples;
  const fixedIndex = options.fixedIndex ? new Int32Array(m) : null;
  const stride = options.table.count > 100 * PROBE_TABLE_STRIDE ? PROBE_TABLE_STRIDE : 1;
  const lastIndex = Math.floor((options.table.count - 1) / stride);
  for (let j = 0; j < m; j++) {
    const i = j * PROBE_STRIDE;
    for (let c = 0; c < 3; c++) {
      samples[j * 3 + c] = options.samples[i * 3 + c];
      samplesRgb[j * 3 + c] = rgb[i * 3 + c];
    }
    if (fixedIndex && options.fixedIndex) fixedIndex[j] = options.fixedIndex[i] < 0 ? -1 : Math.min(Math.round(options.fixedIndex[i] / stride), lastIndex);
  }
  const table = stride > 1 ? coarserTable(options.table, stride) : options.table;
  // One literal of every field (not a spread: a spread gave the options a new shape on every
  // frame, and the fit's compiled code was thrown away and compiled again).
  const subset: PhotoFormationOptions = {
    table,
    samples,
    fitWhiteBalance: options.fitWhiteBalance,
    fitFlare: options.fitFlare,
    noiseSigma: options.noiseSigma,
    initialWhiteBalance: options.initialWhiteBalance,
    fixedIndex,
    space: options.space,
    samplesRgb,
    start: null,
    ownFit: options.ownFit,
    rough: true,
    fitResponse: options.fitResponse,
    onInnerProblem: options.onInnerProblem,
  };
  return fitFrom(subset, coldStart(subset, samples, samplesRgb)).parameters;
}

/**
 * One cost for any parameters on the same samples: each sample's squared colour distance to its
 * best-matching thickness (the table's global best), summed over the best-fitting
 * COMMON_COST_SHARE of them (outliers — glints, foreign pixels — left out by a fixed share, not
 * by a limit that moves with the parameters).
 */
export function commonCost(options: PhotoFormationOptions, parameters: ExposureParameters): number {
  const { table, samples } = options;
  const n = samples.length / 3;
  const predicted = predictIn(options.space, table, parameters, new Float32Array(table.count * 3));
  const assigned = new Int32Array(n);
  assignGlobalBest(predicted, table.count, samples, assigned, options.fixedIndex ?? null);
  const costs = new Float64Array(n);
  for (let i = 0; i < n; i++) costs[i] = distanceAt(predicted, assigned[i], samples[i * 3], samples[i * 3 + 1], samples[i * 3 + 2]);
  costs.sort();
  const keep = Math.max(1, Math.floor(COMMON_COST_SHARE * n));
  let sum = 0;
  for (let i = 0; i < keep; i++) sum += costs[i];
  return sum;
}

/**
 * The alternation of sample thicknesses and the least-squares fit, from `start`. With `settle`,
 * the alternation goes on (up to OUTER_ITERATIONS) while the last least-squares fit stopped short,
 * even when no sample changed its thickness: a finish from a nearby start (`fitPhotoFormation`'s
 * probe) must end where the fit settles, not where its iterations ran out.
 */
function fitFrom(options: PhotoFormationOptions, start: ExposureParameters, settle = false): PhotoFormationFit {
  const { table, samples, noiseSigma } = options;
  const sampleCount = samples.length / 3;
  const warnings: string[] = [];
  let current: ExposureParameters = { exposure: start.exposure, whiteBalance: [...start.whiteBalance], flare: [...start.flare], response: start.response ?? null };
  if (options.fitResponse && table.encoding === 'srgb' && !current.response) current = { ...current, response: IDENTITY_RESPONSE };
  const assigned = new Int32Array(sampleCount);
  const keep = new Uint8Array(sampleCount).fill(1);
  const predicted = new Float32Array(table.count * 3);
  let standardErrors: PhotoFormationFit['standardErrors'] = {
    exposure: NaN,
    whiteBalance: [NaN, NaN, NaN],
    flare: [NaN, NaN, NaN],
    response: [NaN, NaN, NaN],
  };
  let rms = NaN;
  const previous = new Int32Array(sampleCount).fill(-1);
  let settled = true;
  for (let outer = 0; outer < OUTER_ITERATIONS; outer++) {
    predictIn(options.space, table, current, predicted);
    assignGlobalBest(predicted, table.count, samples, assigned, options.fixedIndex ?? null);
    // Stop when no sample changed its thickness by more than a few table steps.
    let moved = 0;
    for (let i = 0; i < sampleCount; i++) if (Math.abs(assigned[i] - previous[i]) > 3) moved++;
    // (With `settle`, an inner fit that stopped short is taken up again even so.)
    if (outer > 0 && moved <= sampleCount * 0.002 && (!settle || settled)) break;
    previous.set(assigned);
    trimOutliers(predicted, table.count, samples, assigned, keep);
    const result = innerFit(options, current, assigned, keep);
    current = result.parameters;
    standardErrors = result.standardErrors;
    rms = result.rms;
    settled = result.settled;
    // An inner fit that stopped short is taken up by the next outer iteration from where it
    // ended: only the last inner fit's warnings describe the parameters returned.
    warnings.length = 0;
    warnings.push(...result.warnings);
  }
  let used = 0;
  for (let i = 0; i < sampleCount; i++) used += keep[i];
  void noiseSigma;
  return { parameters: current, standardErrors, rmsResidual: rms, samplesUsed: used, warnings: [...new Set(warnings)] };
}

/** Flare start: a little below the darkest linear level seen in each channel. */
function estimateFlare(samples: Float32Array, encoding: 'srgb' | 'linear'): [number, number, number] {
  const out: [number, number, number] = [0, 0, 0];
  const n = samples.length / 3;
  for (let c = 0; c < 3; c++) {
    const values = new Float32Array(n);
    for (let i = 0; i < n; i++) values[i] = samples[i * 3 + c];
    values.sort();
    const low = values[Math.floor(0.005 * (n - 1))];
    const linear = encoding === 'linear' ? low : decodeSrgb(low);
    // A bright, uniform film has no dark pixels to show the flare: start no higher than
    // FLARE_START_MAX (the prior keeps it small anyway).
    out[c] = Math.min(0.8 * linear, FLARE_START_MAX);
  }
  return out;
}


/** Coarse search of the exposure gain on a geometric grid, by the trimmed best-match cost. */
function scanExposure(
  table: ColourTable,
  samples: Float32Array,
  whiteBalance: readonly [number, number, number],
  flare: readonly [number, number, number],
  space: MatchSpace | null | undefined,
): number {
  const n = samples.length / 3;
  const stride = Math.max(1, Math.floor(n / SCAN_SAMPLES));
  const scan: ExposureScan = {
    table,
    samples,
    whiteBalance,
    flare,
    space: space ?? null,
    stride,
    predicted: new Float32Array(table.count * 3),
    costs: new Float64Array(Math.ceil(n / stride)),
    hit: { index: 0, distance: 0 },
    bestExposure: 1,
    bestCost: Infinity,
  };
  // Geometric grid 0.1…63 in steps of ×1.26 (28 values), then a finer pass around the best.
  for (let s = 0; s < 29; s++) scanOne(scan, 0.1 * Math.pow(10, s * 0.1));
  const centre = scan.bestExposure;
  for (let s = -4; s <= 4; s++) if (s !== 0) scanOne(scan, centre * Math.pow(10, s * 0.025));
  return scan.bestExposure;
}

/** The state of one exposure scan (a plain object of one shape: scanOne is compiled once). */
interface ExposureScan {
  readonly table: ColourTable;
  readonly samples: Float32Array;
  readonly whiteBalance: readonly [number, number, number];
  readonly flare: readonly [number, number, number];
  readonly space: MatchSpace | null;
  readonly stride: number;
  readonly predicted: Float32Array;
  readonly costs: Float64Array;
  readonly hit: NearestHit;
  bestExposure: number;
  bestCost: number;
}

/** One trial exposure of the scan: its trimmed cost, kept when best so far. */
function scanOne(scan: ExposureScan, exposure: number): void {
  const { table, samples, predicted, costs, hit, stride } = scan;
  const n = samples.length / 3;
  predictIn(scan.space, table, { exposure, whiteBalance: scan.whiteBalance, flare: scan.flare }, predicted);
  let m = 0;
  // The best of every third entry, found through a grid index (the same value as a scan).
  const index = buildNearestEntryIndex(predicted, table.count, 3);
  for (let i = 0; i < n; i += stride) {
    nearestEntry(index, samples[i * 3], samples[i * 3 + 1], samples[i * 3 + 2], hit);
    costs[m++] = hit.distance;
  }
  const sorted = costs.subarray(0, m).sort();
  let sum = 0;
  const keepCount = Math.max(1, Math.floor(0.8 * m));
  for (let i = 0; i < keepCount; i++) sum += sorted[i];
  if (sum < scan.bestCost) {
    scan.bestCost = sum;
    scan.bestExposure = exposure;
  }
}

function assignGlobalBest(
  predicted: Float32Array,
  count: number,
  samples: Float32Array,
  assigned: Int32Array,
  fixedIndex: Int32Array | null,
): void {
  const n = assigned.length;
  // The nearest entry, lowest index among equals, as a scan over the table would give.
  const index = buildNearestEntryIndex(predicted, count);
  const hit: NearestHit = { index: 0, distance: 0 };
  for (let i = 0; i < n; i++) {
    if (fixedIndex && fixedIndex[i] >= 0) {
      assigned[i] = fixedIndex[i];
      continue;
    }
    nearestEntry(index, samples[i * 3], samples[i * 3 + 1], samples[i * 3 + 2], hit);
    assigned[i] = hit.index < 0 ? 0 : hit.index;
  }
}

function trimOutliers(
  predicted: Float32Array,
  count: number,
  samples: Float32Array,
  assigned: Int32Array,
  keep: Uint8Array,
): void {
  const n = assigned.length;
  const costs = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    costs[i] = distanceAt(predicted, assigned[i], samples[i * 3], samples[i * 3 + 1], samples[i * 3 + 2]);
  }
  const median = selectKth(Float64Array.from(costs), Math.floor(n / 2));
  const limit = Math.max(TRIM_FACTOR * median, 1e-6);
  for (let i = 0; i < n; i++) keep[i] = costs[i] <= limit ? 1 : 0;
  void count;
}

interface InnerResult {
  parameters: ExposureParameters;
  standardErrors: PhotoFormationFit['standardErrors'];
  rms: number;
  warnings: string[];
  /** The least-squares fit settled within its iterations. */
  settled: boolean;
}

const PARAMETER_NAMES = [
  'the exposure',
  'the red white-balance gain',
  'the blue white-balance gain',
  'the red flare',
  'the green flare',
  'the blue flare',
  'the tone-curve contrast',
  'the tone-curve gamma',
  'the saturation',
];
const PRIOR_ROWS = 8;
const MAX_ITERATIONS = 25;
/** Three more parameters, and the tone curve bends the path: more room to settle. */
const MAX_ITERATIONS_WITH_RESPONSE = 25;

/**
 * Parameter vector: [exposure, wbR, wbB, flareR, flareG, flareB, contrast, gamma, saturation]
 * (wbG ≡ 1, exposure absorbs it).
 */
function innerFit(
  options: PhotoFormationOptions,
  start: ExposureParameters,
  assigned: Int32Array,
  keep: Uint8Array,
): InnerResult {
  const { table, samples, fitWhiteBalance, fitFlare, noiseSigma } = options;
  const kept: number[] = [];
  for (let i = 0; i < assigned.length; i++) if (keep[i]) kept.push(i);
  const m = kept.length;
  const priorWeight = (Math.sqrt(m) * Math.max(noiseSigma, 1e-3)) / WHITE_BALANCE_PRIOR_SIGMA;
  const flarePriorWeight = (Math.sqrt(m) * Math.max(noiseSigma, 1e-3)) / FLARE_PRIOR_SIGMA;
  const fitResponse = options.fitResponse === true && table.encoding === 'srgb';
  const contrastPriorWeight = (Math.sqrt(m) * Math.max(noiseSigma, 1e-3)) / CONTRAST_PRIOR_SIGMA;
  const gammaPriorWeight = (Math.sqrt(m) * Math.max(noiseSigma, 1e-3)) / LOG_GAMMA_PRIOR_SIGMA;
  const saturationPriorWeight = (Math.sqrt(m) * Math.max(noiseSigma, 1e-3)) / SATURATION_PRIOR_SIGMA;
  const rows = m * 3 + PRIOR_ROWS;
  const y = new Float64Array(rows);
  for (let j = 0; j < m; j++) {
    const i = kept[j];
    y[j * 3] = samples[i * 3];
    y[j * 3 + 1] = samples[i * 3 + 1];
    y[j * 3 + 2] = samples[i * 3 + 2];
  }
  const x = new Float64Array(rows);
  for (let i = 0; i < rows; i++) x[i] = i;
  const wbG = start.whiteBalance[1];
  // Full vector: [exposure, wbR, wbB, flareR, flareG, flareB, contrast, gamma, saturation];
  // only the active ones are fitted.
  const startResponse = start.response ?? IDENTITY_RESPONSE;
  const hasResponse = fitResponse || (start.response !== null && start.response !== undefined);
  const full = [
    start.exposure,
    start.whiteBalance[0],
    start.whiteBalance[2],
    start.flare[0],
    start.flare[1],
    start.flare[2],
    startResponse.contrast,
    startResponse.gamma,
    startResponse.saturation,
  ];
  const lowerFull = [start.exposure * 0.05, 0.25, 0.25, -0.05, -0.05, -0.05, CONTRAST_RANGE[0], GAMMA_RANGE[0], SATURATION_RANGE[0]];
  const upperFull = [start.exposure * 20, 4, 4, 0.6, 0.6, 0.6, CONTRAST_RANGE[1], GAMMA_RANGE[1], SATURATION_RANGE[1]];
  const scaleFull = [start.exposure, 1, 1, 0.05, 0.05, 0.05, 0.1, 0.1, 0.1];
  const active = [0, ...(fitWhiteBalance ? [1, 2] : []), ...(fitFlare ? [3, 4, 5] : []), ...(fitResponse ? [6, 7, 8] : [])];
  const inner = new InnerModel({
    options,
    assigned,
    kept,
    full,
    active,
    wbG,
    hasResponse,
    fitResponse,
    priorWeights: { wb: fitWhiteBalance ? priorWeight : 0, flare: fitFlare ? flarePriorWeight : 0, contrast: contrastPriorWeight, gamma: gammaPriorWeight, saturation: saturationPriorWeight },
    rows,
  });
  const evaluate = (p: readonly number[]): Float64Array => inner.evaluate(p);
  const jacobian = (p: readonly number[], out: Float64Array): void => inner.jacobian(p, out);
  options.onInnerProblem?.({ evaluate, jacobian, initial: active.map((slot) => full[slot]), rows });
  const fit = fitLeastSquaresWithJacobian({
    x,
    y,
    model: (p) => {
      const values = evaluate(p);
      return (row) => values[row];
    },
    modelVector: evaluate,
    jacobian,
    initial: active.map((slot) => full[slot]),
    lower: active.map((slot) => lowerFull[slot]),
    upper: active.map((slot) => upperFull[slot]),
    scale: active.map((slot) => scaleFull[slot]),
    maxIterations: options.rough ? ROUGH_ITERATIONS : fitResponse ? MAX_ITERATIONS_WITH_RESPONSE : MAX_ITERATIONS,
    tolerance: options.rough ? ROUGH_TOLERANCE : 1e-8,
    // The start comes from the exposure scan (first outer iteration) or the previous inner fit:
    // no second polish from it (a third fewer model evaluations, the same parameters on the
    // demo and benchmark photos).
    restartFromInitial: false,
    parameterNames: active.map((slot) => PARAMETER_NAMES[slot]),
  });
  const v = inner.expand(fit.parameters);
  const se = [NaN, 0, 0, 0, 0, 0, NaN, NaN, NaN];
  active.forEach((slot, j) => (se[slot] = fit.standardErrors[j]));
  const priorRss =
    (fitWhiteBalance ? (priorWeight * (v[1] - 1)) ** 2 + (priorWeight * (v[2] - 1)) ** 2 : 0) +
    (fitFlare ? flarePriorWeight ** 2 * (v[3] ** 2 + v[4] ** 2 + v[5] ** 2) : 0) +
    (fitResponse ? (contrastPriorWeight * v[6]) ** 2 + (gammaPriorWeight * Math.log(v[7])) ** 2 + (saturationPriorWeight * (v[8] - 1)) ** 2 : 0);
  return {
    parameters: inner.toParameters(v),
    standardErrors: { exposure: se[0], whiteBalance: [se[1], 0, se[2]], flare: [se[3], se[4], se[5]], response: [se[6], se[7], se[8]] },
    rms: Math.sqrt(Math.max(0, fit.residualSumOfSquares - priorRss) / Math.max(1, m * 3)),
    settled: fit.converged,
    warnings: fit.warnings.map((w) =>
      w.startsWith('did not converge')
        ? `the exposure, white-balance${fitResponse ? ', flare and camera-response' : ' and flare'} fit did not settle within ${fitResponse ? MAX_ITERATIONS_WITH_RESPONSE : MAX_ITERATIONS} iterations: the map uses the best values found, which may be slightly off (see fit_quality; a calibration removes the doubt)`
        : w,
    ),
  };
}

/** What innerFit's model is built from (see InnerModel). */
interface InnerModelInput {
  readonly options: PhotoFormationOptions;
  /** Each sample's assigned table index (the start of its walk). */
  readonly assigned: Int32Array;
  /** The samples taking part (indices into the samples). */
  readonly kept: readonly number[];
  /** Full parameter vector at the start; `active` are the fitted slots. */
  readonly full: readonly number[];
  readonly active: readonly number[];
  readonly wbG: number;
  readonly hasResponse: boolean;
  readonly fitResponse: boolean;
  readonly priorWeights: { wb: number; flare: number; contrast: number; gamma: number; saturation: number };
  readonly rows: number;
}

/**
 * innerFit's model and Jacobian (rows: three per kept sample, then the prior rows). A class, so
 * that its code is compiled once per process: as closures made per inner fit they were optimised
 * anew for every fit (several per frame of a series).
 */
class InnerModel {
  private readonly input: InnerModelInput;
  private readonly table: ColourTable;
  private readonly samples: Float32Array;
  private readonly fixedIndex: Int32Array | null;
  private readonly predicted: Float32Array;
  private readonly modelValues: Float64Array;
  private readonly costScratch = new Float64Array(1);
  /** Each kept sample's table position at the last evaluation (for the Jacobian). */
  private readonly positions: Float64Array;
  /** Each kept sample's table minimum at the last evaluation (−1: a sample of known thickness). */
  private readonly minima: Int32Array;
  private readonly derivativeCache: { entries: Float64Array; done: Uint8Array };
  private cachedKey = '';

  constructor(input: InnerModelInput) {
    this.input = input;
    this.table = input.options.table;
    this.samples = input.options.samples;
    this.fixedIndex = input.options.fixedIndex ?? null;
    this.predicted = new Float32Array(this.table.count * 3);
    this.modelValues = new Float64Array(input.rows);
    this.positions = new Float64Array(input.kept.length);
    this.minima = new Int32Array(input.kept.length);
    this.derivativeCache = { entries: new Float64Array(this.table.count * 3 * PARAMETER_COUNT), done: new Uint8Array(this.table.count) };
  }

  /** The full parameter vector with the fitted slots from `p`. */
  expand(p: readonly number[]): number[] {
    const v = this.input.full.slice();
    this.input.active.forEach((slot, j) => (v[slot] = p[j]));
    return v;
  }

  toParameters(v: readonly number[]): ExposureParameters {
    return {
      exposure: v[0],
      whiteBalance: [v[1], this.input.wbG, v[2]],
      flare: [v[3], v[4], v[5]],
      response: this.input.hasResponse ? { contrast: v[6], gamma: v[7], saturation: v[8] } : null,
    };
  }

  /** The model's value of every row at the fitted parameters `p` (kept until other parameters come). */
  evaluate(p: readonly number[]): Float64Array {
    const key = p.join(',');
    if (key === this.cachedKey) return this.modelValues;
    this.cachedKey = key;
    const v = this.expand(p);
    const { table, predicted } = this;
    predictIn(this.input.options.space, table, this.toParameters(v), predicted);
    this.placeSamples();
    const { modelValues } = this;
    const m = this.input.kept.length;
    const weights = this.input.priorWeights;
    const { fitWhiteBalance, fitFlare } = this.input.options;
    const fitResponse = this.input.fitResponse;
    modelValues[m * 3] = fitWhiteBalance ? weights.wb * (v[1] - 1) : 0;
    modelValues[m * 3 + 1] = fitWhiteBalance ? weights.wb * (v[2] - 1) : 0;
    for (let c = 0; c < 3; c++) modelValues[m * 3 + 2 + c] = fitFlare ? weights.flare * v[3 + c] : 0;
    modelValues[m * 3 + 5] = fitResponse ? weights.contrast * v[6] : 0;
    modelValues[m * 3 + 6] = fitResponse ? weights.gamma * Math.log(v[7]) : 0;
    modelValues[m * 3 + 7] = fitResponse ? weights.saturation * (v[8] - 1) : 0;
    return modelValues;
  }

  /** Each kept sample's walk and refined position on the predicted table, and its model colour. */
  private placeSamples(): void {
    const { table, predicted, samples, fixedIndex, costScratch, positions, minima, modelValues } = this;
    const { kept, assigned } = this.input;
    const m = kept.length;
    for (let j = 0; j < m; j++) {
      const i = kept[j];
      const r = samples[i * 3];
      const g = samples[i * 3 + 1];
      const b = samples[i * 3 + 2];
      const fixed = fixedIndex !== null && fixedIndex[i] >= 0;
      const index = fixed ? assigned[i] : walkDownhill(predicted, table.count, r, g, b, assigned[i]);
      const position = fixed ? index : refinePosition(predicted, table.count, r, g, b, index, costScratch, 0);
      positions[j] = position;
      minima[j] = fixed ? -1 : index;
      interpolateColour(predicted, table.count, position, modelValues, j * 3);
    }
  }

  /** The Jacobian at `p` into `out` (see fillJacobian). */
  jacobian(p: readonly number[], out: Float64Array): void {
    this.evaluate(p);
    const v = this.expand(p);
    fillJacobian(out, {
      derivatives: new EntryDerivativeModel(this.table, this.toParameters(v), this.input.options.space ?? null),
      predicted: this.predicted,
      count: this.table.count,
      positions: this.positions,
      minima: this.minima,
      samples: this.samples,
      kept: this.input.kept,
      active: this.input.active,
      fullParameters: v,
      priorWeights: this.input.priorWeights,
      fitResponse: this.input.fitResponse,
      cache: this.derivativeCache,
    });
  }
}

interface JacobianInput {
  readonly derivatives: EntryDerivativeModel;
  /** The predicted table (matching space) the positions were found on. */
  readonly predicted: Float32Array;
  readonly count: number;
  readonly positions: Float64Array;
  readonly minima: Int32Array;
  /** The samples (matching space), n × 3, indexed by `kept`. */
  readonly samples: Float32Array;
  readonly kept: readonly number[];
  /** Full-vector slot of each fitted parameter. */
  readonly active: readonly number[];
  readonly fullParameters: readonly number[];
  readonly priorWeights: { wb: number; flare: number; contrast: number; gamma: number; saturation: number };
  readonly fitResponse: boolean;
  /** Per table entry: its derivatives (count × 3 × PARAMETER_COUNT) and whether computed yet. */
  readonly cache: { entries: Float64Array; done: Uint8Array };
}

/**
 * The innerFit model's Jacobian (rows: three per kept sample, then the prior rows; columns: the
 * active parameters). A sample's model colour is the table interpolated at the position its
 * downhill walk and parabola refinement found, a position that itself moves with the parameters:
 * its derivative is the interpolated entries' derivatives plus the table's step across the
 * segment times the position's own derivative (`refinedSlope`), i.e. the derivative of exactly
 * the function `evaluate` computes, wherever the walk's minimum stays the same (variable
 * projection, Golub & Pereyra 1973, with the thickness found by the model's own search).
 * Samples of known thickness (anchors) keep their position.
 */
function fillJacobian(out: Float64Array, input: JacobianInput): void {
  const { predicted, count, positions, kept, active, fullParameters, priorWeights } = input;
  const P = PARAMETER_COUNT;
  const columns = active.length;
  const at = new Float64Array(3 * P);
  // Samples share table entries: each entry's derivatives are computed once (entryOffset).
  const entries = input.cache.entries;
  input.cache.done.fill(0);
  out.fill(0);
  const slope = new Float64Array(P);
  for (let j = 0; j < kept.length; j++) {
    const position = positions[j];
    let i = Math.floor(position);
    if (i < 0) i = 0;
    if (i > count - 2) i = count - 2;
    const f = position - i;
    const a = entryOffset(input, i);
    const b = entryOffset(input, i + 1);
    for (let k = 0; k < 3 * P; k++) at[k] = entries[a + k] + f * (entries[b + k] - entries[a + k]);
    // The position moves with the parameters where refinePosition's parabola set it: add the
    // table's step across the segment times d(position)/d(parameters).
    if (refinedSlope(input, j, slope)) {
      for (let c = 0; c < 3; c++) {
        const step = predicted[(i + 1) * 3 + c] - predicted[i * 3 + c];
        for (let k = 0; k < P; k++) at[c * P + k] += step * slope[k];
      }
    }
    for (let c = 0; c < 3; c++) for (let col = 0; col < columns; col++) out[(j * 3 + c) * columns + col] = at[c * P + active[col]];
  }
  // Prior rows (see innerFit's model): weight·(gain − 1), weight·flare, weight·contrast,
  // weight·ln γ, weight·(saturation − 1).
  const base = kept.length * 3;
  const priorSlope = [0, priorWeights.wb, priorWeights.wb, priorWeights.flare, priorWeights.flare, priorWeights.flare, 0, 0, 0];
  if (input.fitResponse) {
    priorSlope[6] = priorWeights.contrast;
    priorSlope[7] = priorWeights.gamma / fullParameters[7];
    priorSlope[8] = priorWeights.saturation;
  }
  const priorRow = [-1, 0, 1, 2, 3, 4, 5, 6, 7];
  for (let a = 0; a < columns; a++) {
    const slot = active[a];
    if (priorRow[slot] >= 0) out[(base + priorRow[slot]) * columns + a] = priorSlope[slot];
  }
}

/** Offset of entry `index`'s derivatives in the cache, computed on first need (fillJacobian). */
function entryOffset(input: JacobianInput, index: number): number {
  const { entries, done } = input.cache;
  const offset = index * 3 * PARAMETER_COUNT;
  if (!done[index]) {
    input.derivatives.fill(index, entries.subarray(offset, offset + 3 * PARAMETER_COUNT));
    done[index] = 1;
  }
  return offset;
}

/**
 * d(position)/d(parameters) of sample j where refinePosition (./matchColour.ts) placed it by the
 * parabola through the squared distances L, H, R at minimum − 1, minimum, minimum + 1:
 * offset = ½(L − R)/(L − 2H + R), each distance's derivative 2(P − s)·∂P/∂p. Writes `slope` and
 * returns true; false where the position does not move locally (a known thickness, the table's
 * ends, no curvature, or the offset held at ±½).
 */
function refinedSlope(input: JacobianInput, j: number, slope: Float64Array): boolean {
  const { minima, predicted, count, samples, kept, cache } = input;
  const m = minima[j];
  if (m <= 0 || m >= count - 1) return false;
  const s = kept[j] * 3;
  const r = samples[s];
  const g = samples[s + 1];
  const b = samples[s + 2];
  const left = distanceAt(predicted, m - 1, r, g, b);
  const here = distanceAt(predicted, m, r, g, b);
  const right = distanceAt(predicted, m + 1, r, g, b);
  const curvature = left - 2 * here + right;
  if (curvature <= 0) return false;
  const offset = (0.5 * (left - right)) / curvature;
  if (offset > 0.5 || offset < -0.5) return false;
  const P = PARAMETER_COUNT;
  const e = cache.entries;
  const l = entryOffset(input, m - 1);
  const h = entryOffset(input, m);
  const q = entryOffset(input, m + 1);
  for (let k = 0; k < P; k++) {
    let dLeft = 0;
    let dHere = 0;
    let dRight = 0;
    for (let c = 0; c < 3; c++) {
      const value = c === 0 ? r : c === 1 ? g : b;
      dLeft += 2 * (predicted[(m - 1) * 3 + c] - value) * e[l + c * P + k];
      dHere += 2 * (predicted[m * 3 + c] - value) * e[h + c * P + k];
      dRight += 2 * (predicted[(m + 1) * 3 + c] - value) * e[q + c * P + k];
    }
    slope[k] = (0.5 * ((dLeft - dRight) * curvature - (left - right) * (dLeft - 2 * dHere + dRight))) / (curvature * curvature);
  }
  return true;
}

/** Linear interpolation of the predicted encoded colour at a fractional table position. */
export function interpolateColour(
  predicted: Float32Array,
  count: number,
  position: number,
  out: Float64Array,
  offset: number,
): void {
  let i = Math.floor(position);
  if (i < 0) i = 0;
  if (i >= count - 1) i = count - 2;
  const f = position - i;
  const a = i * 3;
  const b = a + 3;
  out[offset] = predicted[a] + f * (predicted[b] - predicted[a]);
  out[offset + 1] = predicted[a + 1] + f * (predicted[b + 1] - predicted[a + 1]);
  out[offset + 2] = predicted[a + 2] + f * (predicted[b + 2] - predicted[a + 2]);
}

/**
 * How many distinct colours the samples hold: cells of a 16-level colour cube holding at least
 * 0.5 % of the samples. A few flat colours (a couple of uniform patches) cannot determine
 * exposure, white balance and flare together with the thicknesses.
 */
export function distinctColourCount(samples: Float32Array): number {
  const n = samples.length / 3;
  const counts = new Uint32Array(16 * 16 * 16);
  for (let i = 0; i < n; i++) {
    const q = (v: number): number => Math.min(15, Math.max(0, Math.floor(v * 16)));
    counts[(q(samples[i * 3]) * 16 + q(samples[i * 3 + 1])) * 16 + q(samples[i * 3 + 2])]++;
  }
  let distinct = 0;
  const threshold = Math.max(2, 0.005 * n);
  for (let c = 0; c < counts.length; c++) if (counts[c] >= threshold) distinct++;
  return distinct;
}
