/**
 * Drainage laws fitted to a film's thickness over time, h(t) in nm, t in s from the first frame.
 *
 * - `exponential`: h(t) = h∞ + (h0 − h∞)·exp(−t/τ), a first-order approach to a final thickness
 *   (empirical description of a film approaching its equilibrium thickness; common practice).
 * - `power-law`: h(t) = h0·(1 + t/t0)^(−b), i.e. a·(t + t0)^(−b) with a = h0·t0^b, written so that
 *   every parameter is of order its data (h0 in nm, t0 in s). b = 1/2 is Reynolds thinning.
 * - `reynolds`: the same with b fixed at 1/2. Reynolds' lubrication result for a disc between
 *   rigid, parallel interfaces, −dh/dt = 2h³ΔP / (3μR²) (Reynolds 1886, Phil. Trans. R. Soc. 177,
 *   157–234; applied to foam films by Scheludko 1967, Adv. Colloid Interface Sci. 1, 391–464),
 *   integrates to 1/h² = 1/h0² + 4ΔP·t / (3μR²), i.e. h = h0·(1 + t/t0)^(−1/2) with
 *   t0 = 3μR² / (4ΔP·h0²).
 * Each model carries its inverse (time at which h reaches a given thickness), used for the
 * predicted crossing of the thin threshold; it returns null when the curve never gets there.
 */

export interface DrainageModel {
  readonly name: 'exponential' | 'power-law' | 'reynolds';
  readonly formula: string;
  readonly parameterNames: readonly string[];
  readonly model: (p: readonly number[]) => (tS: number) => number;
  /** First guess from the data (times ascending). */
  readonly initial: (tS: readonly number[], hNm: readonly number[]) => number[];
  readonly lower: (tS: readonly number[], hNm: readonly number[]) => number[];
  readonly upper: (tS: readonly number[], hNm: readonly number[]) => number[];
  /** Time (s) at which h(t) = thicknessNm for t >= 0, or null if never. */
  readonly timeAtThickness: (p: readonly number[], thicknessNm: number) => number | null;
}

const span = (t: readonly number[]): number => Math.max(t[t.length - 1] - t[0], 1e-9);
const maxOf = (h: readonly number[]): number => h.reduce((m, v) => Math.max(m, v), -Infinity);
const minOf = (h: readonly number[]): number => h.reduce((m, v) => Math.min(m, v), Infinity);

export const exponentialModel: DrainageModel = {
  name: 'exponential',
  formula: 'h(t) = hInf + (h0 - hInf) * exp(-t / tau)',
  parameterNames: ['h0Nm', 'hInfNm', 'tauS'],
  model: ([h0, hInf, tau]) => (t) => hInf + (h0 - hInf) * Math.exp(-t / tau),
  initial: (t, h) => [h[0], Math.max(0, minOf(h) * 0.9), span(t) / 3],
  lower: (t) => [0, 0, span(t) * 1e-4],
  upper: (t, h) => [maxOf(h) * 10, maxOf(h) * 10, span(t) * 1e4],
  timeAtThickness: ([h0, hInf, tau], thickness) => {
    const ratio = (thickness - hInf) / (h0 - hInf);
    if (!(ratio > 0 && ratio <= 1)) return null;
    return -tau * Math.log(ratio);
  },
};

function powerTime(h0: number, t0: number, b: number, thickness: number): number | null {
  if (!(thickness > 0) || !(b > 0) || !(t0 > 0) || thickness > h0) return null;
  return t0 * (Math.pow(thickness / h0, -1 / b) - 1);
}

export const powerLawModel: DrainageModel = {
  name: 'power-law',
  formula: 'h(t) = h0 * (1 + t / t0)^(-b)',
  parameterNames: ['h0Nm', 't0S', 'b'],
  model: ([h0, t0, b]) => (t) => h0 * Math.pow(1 + t / t0, -b),
  initial: (t, h) => [h[0], span(t) / 5, 0.5],
  lower: (t) => [0, span(t) * 1e-5, 0.01],
  upper: (t, h) => [maxOf(h) * 10, span(t) * 1e4, 10],
  timeAtThickness: ([h0, t0, b], thickness) => powerTime(h0, t0, b, thickness),
};

export const reynoldsModel: DrainageModel = {
  name: 'reynolds',
  formula: 'h(t) = h0 * (1 + t / t0)^(-1/2)',
  parameterNames: ['h0Nm', 't0S'],
  model: ([h0, t0]) => (t) => h0 / Math.sqrt(1 + t / t0),
  initial: (t, h) => [h[0], span(t) / 5],
  lower: (t) => [0, span(t) * 1e-5],
  upper: (t, h) => [maxOf(h) * 10, span(t) * 1e4],
  timeAtThickness: ([h0, t0], thickness) => powerTime(h0, t0, 0.5, thickness),
};

export const DRAINAGE_MODELS: readonly DrainageModel[] = [exponentialModel, powerLawModel, reynoldsModel];
