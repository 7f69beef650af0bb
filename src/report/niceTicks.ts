/**
 * "Nice" axis ticks: steps of 1, 2 or 5 times a power of ten, chosen so about `count` ticks fall
 * in [min, max]. The thresholds √50, √10, √2 follow the method of d3-array's `tickStep`
 * (Bostock, d3-array, ticks.js). Ticks are built as `start + i * step` (or `(start + i) / inverse`
 * for steps below 1, so 0.3 prints as 0.3), never as a running sum.
 */

export interface TickSpec {
  /** Tick spacing (positive), or 0 when no ticks can be made. */
  readonly step: number;
  /** Tick values in ascending order, all within [min, max]. */
  readonly values: number[];
  /** Decimals needed to print every tick exactly at this step. */
  readonly decimals: number;
}

const e10 = Math.sqrt(50);
const e5 = Math.sqrt(10);
const e2 = Math.sqrt(2);

/** Spacing of about `count` nice ticks over [min, max]: 1, 2 or 5 × 10^k. */
export function niceTickStep(min: number, max: number, count: number): number {
  const span = Math.abs(max - min);
  if (!Number.isFinite(span) || span === 0 || !(count > 0)) return 0;
  const raw = span / count;
  const power = Math.floor(Math.log10(raw));
  const error = raw / 10 ** power;
  const factor = error >= e10 ? 10 : error >= e5 ? 5 : error >= e2 ? 2 : 1;
  return power >= 0 ? factor * 10 ** power : factor / 10 ** -power;
}

/** About `count` nice ticks within [min, max] (order of min and max does not matter). */
export function niceTicks(min: number, max: number, count = 5): TickSpec {
  if (!Number.isFinite(min) || !Number.isFinite(max)) {
    throw new RangeError(`niceTicks: min and max must be finite numbers, received ${min} and ${max}`);
  }
  const lo = Math.min(min, max);
  const hi = Math.max(min, max);
  if (lo === hi) return { step: 0, values: [lo], decimals: decimalsOf(lo) };
  const step = niceTickStep(lo, hi, count);
  if (step === 0) return { step: 0, values: [lo, hi], decimals: 0 };
  const values: number[] = [];
  if (step >= 1) {
    let start = Math.ceil(lo / step);
    let stop = Math.floor(hi / step);
    if (start * step < lo) start++; // lo / step can underflow or round below the true quotient
    if (stop * step > hi) stop--;
    for (let i = 0; start + i <= stop; i++) values.push((start + i) * step);
  } else {
    const inverse = Math.round(1 / step);
    let start = Math.ceil(lo * inverse);
    let stop = Math.floor(hi * inverse);
    if (start / inverse < lo) start++;
    if (stop / inverse > hi) stop--;
    for (let i = 0; start + i <= stop; i++) values.push((start + i) / inverse);
  }
  return { step, values, decimals: Math.max(0, -Math.floor(Math.log10(step) + 1e-9)) };
}

/** Widens [min, max] outward to multiples of the nice step, for an axis that ends on a tick. */
export function niceDomain(min: number, max: number, count = 5): [number, number] {
  const lo = Math.min(min, max);
  const hi = Math.max(min, max);
  if (lo === hi) {
    const pad = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    return niceDomain(lo - pad, hi + pad, count);
  }
  const step = niceTickStep(lo, hi, count);
  if (step === 0) return [lo, hi];
  if (step >= 1) return [Math.floor(lo / step) * step, Math.ceil(hi / step) * step];
  const inverse = Math.round(1 / step);
  return [Math.floor(lo * inverse) / inverse, Math.ceil(hi * inverse) / inverse];
}

function decimalsOf(value: number): number {
  const text = String(value);
  const dot = text.indexOf('.');
  return dot < 0 || text.includes('e') ? 0 : text.length - dot - 1;
}
