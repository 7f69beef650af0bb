/**
 * Reflectance of a stack at one spectral line, tabulated against the film thickness, split into
 * monotonic branches between neighbouring extremes, and inverted branch by branch.
 *
 * This generalises the formula of Scheludko (`scheludko.ts`) to any stack the transfer-matrix
 * model describes (oxide or nitride on silicon, films on glass, free films at an angle): on a
 * branch R(h) is monotonic, so a reflectance gives one thickness per branch, and the fringe order
 * of a pixel is the choice of branch. Branch b runs from extreme b to extreme b + 1; extreme 0 is
 * h = 0. For a lossless film R(h) is periodic with extremes at every quarter wave (common
 * practice), so the kinds (maximum / minimum) alternate along the table.
 */

export type ReflectanceOfThickness = (thicknessesNm: Float64Array) => Float64Array;

export const EXTREME_MAX = 1;
export const EXTREME_MIN = -1;

export interface LineReflectanceTable {
  readonly lineNm: number;
  readonly stepNm: number;
  /** R at thickness i · stepNm, i = 0 … n − 1. */
  readonly reflectance: Float64Array;
  /** Sample index of each branch boundary: 0, the interior extremes, the last sample. */
  readonly boundaryIndex: Int32Array;
  /** EXTREME_MAX or EXTREME_MIN for each boundary (alternating; the ends take the kind that continues the alternation). */
  readonly boundaryKind: Int8Array;
  /** Number of monotonic branches (boundaries − 1). */
  readonly branchCount: number;
  /** Typical R at a maximum and at a minimum (median over the table's extremes). */
  readonly levelMax: number;
  readonly levelMin: number;
}

function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** Tabulates R(h) on 0 … maxThicknessNm in steps of `stepNm` and finds its branches. */
export function buildLineReflectanceTable(
  reflectanceOf: ReflectanceOfThickness,
  lineNm: number,
  maxThicknessNm: number,
  stepNm = 0.25,
): LineReflectanceTable {
  if (!Number.isFinite(maxThicknessNm) || maxThicknessNm <= 0) {
    throw new RangeError(`maxThicknessNm must be a finite number > 0, received ${maxThicknessNm}`);
  }
  if (!Number.isFinite(stepNm) || stepNm <= 0 || stepNm > maxThicknessNm / 4) {
    throw new RangeError(`stepNm must be > 0 and <= maxThicknessNm / 4, received ${stepNm}`);
  }
  const n = Math.floor(maxThicknessNm / stepNm + 1e-9) + 1;
  const thicknessesNm = new Float64Array(n);
  for (let i = 0; i < n; i++) thicknessesNm[i] = i * stepNm;
  const reflectance = Float64Array.from(reflectanceOf(thicknessesNm));
  if (reflectance.length !== n) {
    throw new RangeError(`reflectanceOf must return ${n} values, received ${reflectance.length}`);
  }
  const index: number[] = [0];
  const kind: number[] = [0];
  let lastSlope = 0;
  for (let i = 1; i < n; i++) {
    const slope = Math.sign(reflectance[i] - reflectance[i - 1]);
    if (slope === 0) continue;
    if (lastSlope !== 0 && slope !== lastSlope) {
      index.push(i - 1);
      kind.push(lastSlope > 0 ? EXTREME_MAX : EXTREME_MIN);
    }
    lastSlope = slope;
  }
  index.push(n - 1);
  kind.push(0);
  // Ends continue the alternation of the interior extremes.
  if (kind.length > 2) {
    kind[0] = -kind[1];
    kind[kind.length - 1] = -kind[kind.length - 2];
  } else {
    const rising = reflectance[n - 1] >= reflectance[0];
    kind[0] = rising ? EXTREME_MIN : EXTREME_MAX;
    kind[1] = -kind[0];
  }
  const maxima: number[] = [];
  const minima: number[] = [];
  for (let b = 1; b < index.length - 1; b++) (kind[b] > 0 ? maxima : minima).push(reflectance[index[b]]);
  // h = 0 is an extreme of a lossless film; use it (and the far end) only when the interior has none.
  if (maxima.length === 0) maxima.push(kind[0] > 0 ? reflectance[0] : reflectance[n - 1]);
  if (minima.length === 0) minima.push(kind[0] < 0 ? reflectance[0] : reflectance[n - 1]);
  return {
    lineNm,
    stepNm,
    reflectance,
    boundaryIndex: Int32Array.from(index),
    boundaryKind: Int8Array.from(kind),
    branchCount: index.length - 1,
    levelMax: median(maxima),
    levelMin: median(minima),
  };
}

/** Thickness range [fromNm, toNm] of branch `branch`. */
export function branchRangeNm(table: LineReflectanceTable, branch: number): [number, number] {
  return [table.boundaryIndex[branch] * table.stepNm, table.boundaryIndex[branch + 1] * table.stepNm];
}

/** Branch that contains `thicknessNm` (the lower one at a boundary); −1 beyond the table. */
export function branchOfThickness(table: LineReflectanceTable, thicknessNm: number): number {
  const i = thicknessNm / table.stepNm;
  const bi = table.boundaryIndex;
  if (!(i >= 0) || i > bi[bi.length - 1] + 1e-9) return -1;
  for (let b = 0; b < table.branchCount; b++) if (i <= bi[b + 1]) return b;
  return table.branchCount - 1;
}

/**
 * Thickness (nm) on branch `branch` whose tabulated R equals `reflectance` (clamped to the
 * branch's range), by bisection and linear interpolation. No allocation; safe in pixel loops.
 */
export function thicknessOnBranch(table: LineReflectanceTable, branch: number, reflectance: number): number {
  const r = table.reflectance;
  let lo = table.boundaryIndex[branch];
  let hi = table.boundaryIndex[branch + 1];
  const rising = r[hi] >= r[lo];
  const sign = rising ? 1 : -1;
  const target = sign * reflectance;
  if (target <= sign * r[lo]) return lo * table.stepNm;
  if (target >= sign * r[hi]) return hi * table.stepNm;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (sign * r[mid] < target) lo = mid;
    else hi = mid;
  }
  const span = r[hi] - r[lo];
  const t = span !== 0 ? (reflectance - r[lo]) / span : 0;
  return (lo + t) * table.stepNm;
}

/** |dR/dh| (1/nm) of the table at `thicknessNm` (central difference). */
export function reflectanceSlopePerNm(table: LineReflectanceTable, thicknessNm: number): number {
  const r = table.reflectance;
  const i = Math.min(r.length - 2, Math.max(1, Math.round(thicknessNm / table.stepNm)));
  return Math.abs(r[i + 1] - r[i - 1]) / (2 * table.stepNm);
}
