/**
 * Before and after (`lamella compare`): the difference of two thickness maps of the same size,
 * after − before in nm (negative where material was removed), optionally as a rate in nm/min
 * over a known duration, with its statistics and uniformity figures. The after map may be offset
 * by a known whole-pixel shift: the point at (x, y) in the before map lies at (x + DX, y + DY) in
 * the after map. Pixels without a value in either map (NaN) have no difference.
 */
import { UsageError } from '../errors.js';
import { uniformityOf, valueStatistics, type UniformityFigures, type ValueStatistics } from './uniformity.js';

export interface ThicknessGrid {
  readonly data: Float32Array;
  readonly width: number;
  readonly height: number;
}

export interface CompareOptions {
  /** Time between the two maps, s (gives a rate map in nm/min). */
  readonly durationS?: number | null;
  /** Whole-pixel offset of the after map against the before map. */
  readonly shiftPx?: readonly [number, number];
}

export interface Comparison {
  readonly width: number;
  readonly height: number;
  /** after − before, nm, on the before map's pixels (NaN where either has no value). */
  readonly differenceNm: Float32Array;
  /** The difference per minute, nm/min, with a duration; else null. */
  readonly rateNmPerMin: Float32Array | null;
  readonly comparedPx: number;
  readonly statistics: ValueStatistics;
  /** The rate's statistics (nm/min), with a duration. */
  readonly rateStatistics: ValueStatistics | null;
  /**
   * Uniformity of the change: of the amount removed (before − after) when the mean change is
   * negative (an etch), else of the amount added (a deposition).
   */
  readonly uniformity: UniformityFigures;
  readonly change: 'removed' | 'added' | 'none';
  readonly shiftPx: readonly [number, number];
  readonly durationS: number | null;
}

/** The difference map and its figures; a usage error when the sizes differ or the shift is not whole pixels. */
export function compareGrids(before: ThicknessGrid, after: ThicknessGrid, options: CompareOptions = {}, names: readonly [string, string] = ['BEFORE', 'AFTER']): Comparison {
  if (before.width !== after.width || before.height !== after.height) {
    throw new UsageError(`compare: the maps differ in size: ${names[0]} is ${before.width}×${before.height}, ${names[1]} is ${after.width}×${after.height} (maps of the same size are required; --shift only offsets them)`);
  }
  const [dx, dy] = options.shiftPx ?? [0, 0];
  if (!Number.isInteger(dx) || !Number.isInteger(dy)) throw new UsageError(`--shift takes whole pixels DX,DY, received ${dx},${dy}`);
  if (Math.abs(dx) >= before.width || Math.abs(dy) >= before.height) throw new UsageError(`--shift ${dx},${dy} moves the after map off the before map (${before.width}×${before.height})`);
  const durationS = options.durationS ?? null;
  if (durationS !== null && !(durationS > 0 && Number.isFinite(durationS))) throw new UsageError(`--duration must be a number of seconds > 0, received ${durationS}`);
  const { width, height } = before;
  const differenceNm = new Float32Array(width * height).fill(Number.NaN);
  let compared = 0;
  for (let y = 0; y < height; y++) {
    const ay = y + dy;
    if (ay < 0 || ay >= height) continue;
    for (let x = 0; x < width; x++) {
      const ax = x + dx;
      if (ax < 0 || ax >= width) continue;
      const d = after.data[ay * width + ax] - before.data[y * width + x];
      if (Number.isFinite(d)) {
        differenceNm[y * width + x] = d;
        compared++;
      }
    }
  }
  const values = new Float64Array(compared);
  for (let i = 0, k = 0; i < differenceNm.length; i++) if (Number.isFinite(differenceNm[i])) values[k++] = differenceNm[i];
  const statistics = valueStatistics(values.slice());
  const mean = statistics.mean_nm ?? 0;
  const change = mean < 0 ? 'removed' : mean > 0 ? 'added' : 'none';
  if (change === 'removed') for (let i = 0; i < values.length; i++) values[i] = -values[i];
  const uniformity = uniformityOf(valueStatistics(values));
  let rateNmPerMin: Float32Array | null = null;
  let rateStatistics: ValueStatistics | null = null;
  if (durationS !== null) {
    const perMin = 60 / durationS;
    rateNmPerMin = new Float32Array(differenceNm.length);
    const rates = new Float64Array(compared);
    for (let i = 0, k = 0; i < differenceNm.length; i++) {
      rateNmPerMin[i] = differenceNm[i] * perMin;
      if (Number.isFinite(differenceNm[i])) rates[k++] = differenceNm[i] * perMin;
    }
    rateStatistics = valueStatistics(rates);
  }
  return { width, height, differenceNm, rateNmPerMin, comparedPx: compared, statistics, rateStatistics, uniformity, change, shiftPx: [dx, dy], durationS };
}

/** `--shift DX,DY` (whole pixels). */
export function parseShift(text: string): [number, number] {
  const m = /^\s*(-?\d+)\s*,\s*(-?\d+)\s*$/.exec(text);
  if (!m) throw new UsageError(`--shift must be DX,DY in whole pixels (e.g. 3,-2), received ${JSON.stringify(text)}`);
  return [Number(m[1]), Number(m[2])];
}

/**
 * A diverging picture of a signed map: blue below zero, white at zero, red above, symmetric about
 * zero up to `limit`; NaN grey. RGB bytes, row by row.
 */
export function divergingRaster(values: Float32Array, limit: number): Uint8Array {
  const out = new Uint8Array(values.length * 3);
  const l = limit > 0 ? limit : 1;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const o = i * 3;
    if (!Number.isFinite(v)) {
      out[o] = 128;
      out[o + 1] = 128;
      out[o + 2] = 128;
      continue;
    }
    const t = Math.max(-1, Math.min(1, v / l));
    const [r, g, b] = divergingColour(t);
    out[o] = r;
    out[o + 1] = g;
    out[o + 2] = b;
  }
  return out;
}

/** Colour at t in −1..1: dark blue (−1) through white (0) to dark red (+1). */
export function divergingColour(t: number): [number, number, number] {
  const lo: [number, number, number] = [33, 72, 160];
  const hi: [number, number, number] = [178, 34, 34];
  const end = t < 0 ? lo : hi;
  const a = Math.abs(t);
  return [Math.round(255 + (end[0] - 255) * a), Math.round(255 + (end[1] - 255) * a), Math.round(255 + (end[2] - 255) * a)];
}

/** The symmetric colour limit of a difference map: the larger of |p01| and |p99| (at least 1 nm). */
export function symmetricLimit(values: Float32Array): number {
  const finite: number[] = [];
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i])) finite.push(Math.abs(values[i]));
  if (finite.length === 0) return 1;
  finite.sort((a, b) => a - b);
  return Math.max(1, finite[Math.min(finite.length - 1, Math.floor(0.99 * (finite.length - 1)))]);
}
