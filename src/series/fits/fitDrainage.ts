/**
 * Fits a drainage law (./drainageModels.ts) to thickness-versus-time points by Levenberg–Marquardt
 * (`src/fit`), reports parameters ± standard uncertainty (square roots of the covariance
 * diagonal), R² = 1 − RSS/TSS and RMS = √(RSS/n), and the time at which the curve crosses a
 * thickness threshold with a ±1σ-equivalent interval: the 15.87 % and 84.13 % quantiles of the
 * crossing time over parameter sets drawn from N(p̂, covariance) (linearised uncertainty
 * propagation by sampling; JCGM 101:2008, "Propagation of distributions using a Monte Carlo
 * method", §7). Draws that never cross count as +∞. With the time of a rupture (the first frame
 * without film), a crossing the fitted curve would make later than that is not predicted: the
 * film was gone by then (`beyondRupture`, times null).
 */
import { fitLeastSquares } from '../../fit/fitLeastSquares.js';
import type { DrainageModel } from './drainageModels.js';
import { sampleNormal } from './sampleNormal.js';

export interface CrossingPrediction {
  readonly thresholdNm: number;
  /** Best-fit crossing time (s), or null if the fitted curve never reaches the threshold. */
  readonly timeS: number | null;
  readonly lowS: number | null;
  /** Null when more than 15.87 % of the draws never cross (no upper bound). */
  readonly highS: number | null;
  /** True when the crossing lies after the last frame (a prediction beyond the data). */
  readonly extrapolated: boolean;
  /** True when the fitted curve is already below the threshold at the first frame. */
  readonly belowAtStart: boolean;
  /** The first frame time at which the measured series is already below the threshold, if any. */
  readonly observedS: number | null;
  /**
   * True when the fitted curve would reach the threshold only after the film had ruptured (after
   * the first frame without film): no crossing is predicted then (timeS, lowS, highS null).
   */
  readonly beyondRupture: boolean;
}

export interface DrainageFit {
  readonly model: DrainageModel['name'];
  readonly formula: string;
  readonly quantity: 'mean' | 'min';
  readonly points: number;
  readonly parameters: Record<string, { readonly value: number; readonly uncertainty: number | null }>;
  readonly covariance: number[][];
  readonly rSquared: number | null;
  readonly rmsNm: number;
  readonly converged: boolean;
  readonly iterations: number;
  readonly warnings: string[];
  readonly crossing: CrossingPrediction | null;
}

export interface FitDrainageOptions {
  readonly quantity: 'mean' | 'min';
  readonly thinBelowNm: number | null;
  readonly samples?: number;
  readonly seed?: number;
  /** Time (s) of the first frame without film after the rupture; crossings later than it are not predicted. */
  readonly ruptureS?: number | null;
}

function quantile(sorted: readonly number[], q: number): number {
  const position = q * (sorted.length - 1);
  const low = Math.floor(position);
  const high = Math.min(low + 1, sorted.length - 1);
  return sorted[low] + (sorted[high] - sorted[low]) * (position - low);
}

function crossingOf(model: DrainageModel, p: number[], covariance: number[][], tS: readonly number[], hNm: readonly number[], threshold: number, options: FitDrainageOptions): CrossingPrediction {
  const timeS = model.timeAtThickness(p, threshold);
  const finite = covariance.every((row) => row.every(Number.isFinite));
  let lowS: number | null = null;
  let highS: number | null = null;
  if (finite) {
    const draws = sampleNormal(p, covariance, options.samples ?? 2000, options.seed ?? 1)
      .map((q) => model.timeAtThickness(q, threshold) ?? Infinity)
      .sort((a, b) => a - b);
    const low = quantile(draws, 0.158655);
    const high = quantile(draws, 0.841345);
    lowS = Number.isFinite(low) ? low : null;
    highS = Number.isFinite(high) ? high : null;
  }
  const index = hNm.findIndex((h) => h < threshold);
  const lastS = tS[tS.length - 1];
  const belowAtStart = model.model(p)(tS[0]) < threshold;
  const ruptureS = options.ruptureS ?? null;
  if (ruptureS !== null && !belowAtStart && timeS !== null && timeS > ruptureS) {
    return { thresholdNm: threshold, timeS: null, lowS: null, highS: null, extrapolated: false, belowAtStart, observedS: index >= 0 ? tS[index] : null, beyondRupture: true };
  }
  return {
    thresholdNm: threshold,
    timeS,
    lowS,
    highS,
    extrapolated: !belowAtStart && (timeS === null || timeS > lastS),
    belowAtStart,
    observedS: index >= 0 ? tS[index] : null,
    beyondRupture: false,
  };
}

export function fitDrainage(tS: readonly number[], hNm: readonly number[], model: DrainageModel, options: FitDrainageOptions): DrainageFit {
  if (tS.length !== hNm.length) throw new RangeError(`tS and hNm must have the same length, received ${tS.length} and ${hNm.length}`);
  const k = model.parameterNames.length;
  if (tS.length < k + 1) throw new RangeError(`${model.name} fit needs at least ${k + 1} frames with a ${options.quantity} thickness, received ${tS.length}`);
  const hMax = hNm.reduce((m, v) => Math.max(m, Math.abs(v)), 0) || 1;
  const tSpan = Math.max(tS[tS.length - 1] - tS[0], 1e-9);
  const scale = model.parameterNames.map((name) => (name.endsWith('Nm') ? hMax : name.endsWith('S') ? tSpan : 1));
  const fit = fitLeastSquares({
    x: [...tS],
    y: [...hNm],
    model: (p: readonly number[]) => model.model(p),
    initial: model.initial(tS, hNm),
    lower: model.lower(tS, hNm),
    upper: model.upper(tS, hNm),
    scale,
    maxIterations: 500,
    tolerance: 1e-10,
  });
  const p = [...fit.parameters];
  const meanH = hNm.reduce((s, v) => s + v, 0) / hNm.length;
  const tss = hNm.reduce((s, v) => s + (v - meanH) ** 2, 0);
  const parameters: DrainageFit['parameters'] = {};
  model.parameterNames.forEach((name, i) => {
    const se = fit.standardErrors[i];
    parameters[name] = { value: p[i], uncertainty: Number.isFinite(se) ? se : null };
  });
  const covariance = fit.covariance.map((row: readonly number[]) => [...row]);
  return {
    model: model.name,
    formula: model.formula,
    quantity: options.quantity,
    points: tS.length,
    parameters,
    covariance,
    rSquared: tss > 0 ? 1 - fit.residualSumOfSquares / tss : null,
    rmsNm: Math.sqrt(fit.residualSumOfSquares / tS.length),
    converged: fit.converged,
    iterations: fit.iterations,
    warnings: [...fit.warnings],
    crossing: options.thinBelowNm === null ? null : crossingOf(model, p, covariance, tS, hNm, options.thinBelowNm, options),
  };
}
