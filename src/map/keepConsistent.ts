/**
 * A second look at pixels whose colour matched poorly. The colour test alone drops two kinds of
 * pixel: true mixtures (JPEG blends colours where the thickness changes steeply, e.g. the rings
 * around a thin spot), whose estimate is unreliable; and pixels of a smooth film whose residual is
 * merely larger than the noise model expects (a channel clipped near black, where the sRGB curve
 * magnifies the noise; the model's own colour error at some thicknesses). The second kind shows
 * up as thin lines of "no estimate" across good maps.
 *
 * Spatial evidence tells them apart: a pixel is kept when its estimate agrees with the plane
 * fitted by least squares to the well-matched pixels around it (5 × 5 window), and that plane
 * describes them well. Mixtures sit where the field is steep or broken and their estimates miss
 * the plane, so they stay without an estimate. Kept pixels carry the low confidence their colour
 * cost gives them. Only well-matched neighbours are used as evidence (never pixels kept here), so
 * the outcome does not depend on the order of the pass.
 *
 * Thresholds scale with the interference order period P (λ/(2n cos θ)): at least MIN_NEIGHBOURS
 * well-matched neighbours; plane residual (RMS) ≤ 0.04 P; slope ≤ 0.2 P per pixel (steeper fields
 * alias in colour); estimate within max(3 × RMS, 0.01 P) of the plane. They were set on invented
 * draining-film frames against their known thickness (kept pixels: median error ≈ 1.3 nm, none
 * off by an order) and are checked by tests/map-keep-consistent.test.ts.
 */
import { PixelStatus } from './types.js';

export interface KeepConsistentInput {
  readonly width: number;
  readonly height: number;
  /** Per-pixel status; poor matches are `ambiguous` with a finite thickness. */
  readonly status: Uint8Array;
  /** Thickness estimates, nm; poor matches keep theirs until decided here. */
  readonly thicknessNm: Float32Array;
  /** Confidence of each pixel (already computed for poor matches too); zeroed when dropped. */
  readonly confidence: Float32Array;
  /** Interference order period, nm. */
  readonly orderPeriodNm: number;
  /** False: no second look, every poor match loses its estimate (default true). */
  readonly keep?: boolean;
}

const RADIUS = 2;
const MIN_NEIGHBOURS = 6;
const MAX_RMS_PERIODS = 0.04;
const MAX_SLOPE_PERIODS = 0.2;
const MIN_TOLERANCE_PERIODS = 0.01;
/** Temporary status of a kept pixel (not yet evidence for others). */
const KEPT = 254;

/**
 * Decides every poor match (status ambiguous, finite thickness): kept pixels become `ok`, the
 * others lose their estimate (NaN, confidence 0). Returns how many were kept.
 */
export function keepConsistentPixels(input: KeepConsistentInput): number {
  const { width, height, status, thicknessNm, confidence } = input;
  const period = input.orderPeriodNm;
  const maxRms = MAX_RMS_PERIODS * period;
  const maxSlope = MAX_SLOPE_PERIODS * period;
  const minTolerance = MIN_TOLERANCE_PERIODS * period;
  let kept = 0;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (status[i] !== PixelStatus.ambiguous) continue;
      const t = thicknessNm[i];
      if (t !== t) continue;
      if (input.keep !== false && agreesWithPlane(input, x, y, t, maxRms, maxSlope, minTolerance)) {
        status[i] = KEPT;
        kept++;
      } else {
        thicknessNm[i] = NaN;
        confidence[i] = 0;
      }
    }
  }
  if (kept > 0) for (let i = 0; i < status.length; i++) if (status[i] === KEPT) status[i] = PixelStatus.ok;
  return kept;
}

/**
 * Least-squares plane t ≈ a + b·dx + c·dy through the well-matched neighbours of (x, y) within
 * RADIUS; true when it is well determined and flat enough and `t` lies on it.
 */
function agreesWithPlane(
  input: KeepConsistentInput,
  x: number,
  y: number,
  t: number,
  maxRms: number,
  maxSlope: number,
  minTolerance: number,
): boolean {
  const { width, height, status, thicknessNm } = input;
  // Sums for the normal equations, with values relative to the first neighbour (conditioning).
  let n = 0;
  let sx = 0;
  let sy = 0;
  let sxx = 0;
  let syy = 0;
  let sxy = 0;
  let sv = 0;
  let svx = 0;
  let svy = 0;
  let svv = 0;
  let origin = NaN;
  for (let dy = -RADIUS; dy <= RADIUS; dy++) {
    const ny = y + dy;
    if (ny < 0 || ny >= height) continue;
    for (let dx = -RADIUS; dx <= RADIUS; dx++) {
      const nx = x + dx;
      if (nx < 0 || nx >= width || (dx === 0 && dy === 0)) continue;
      const j = ny * width + nx;
      if (status[j] !== PixelStatus.ok) continue;
      if (origin !== origin) origin = thicknessNm[j];
      const v = thicknessNm[j] - origin;
      n++;
      sx += dx;
      sy += dy;
      sxx += dx * dx;
      syy += dy * dy;
      sxy += dx * dy;
      sv += v;
      svx += v * dx;
      svy += v * dy;
      svv += v * v;
    }
  }
  if (n < MIN_NEIGHBOURS) return false;
  // Solve [[n, sx, sy], [sx, sxx, sxy], [sy, sxy, syy]]·[a, b, c] = [sv, svx, svy] (Cramer).
  const m00 = sxx * syy - sxy * sxy;
  const m01 = sx * syy - sxy * sy;
  const m02 = sx * sxy - sxx * sy;
  const det = n * m00 - sx * m01 + sy * m02;
  if (!(Math.abs(det) > 1e-9)) return false;
  const a = (sv * m00 - sx * (svx * syy - sxy * svy) + sy * (svx * sxy - sxx * svy)) / det;
  const b = (n * (svx * syy - sxy * svy) - sv * m01 + sy * (sx * svy - svx * sy)) / det;
  const c = (n * (sxx * svy - svx * sxy) - sx * (sx * svy - svx * sy) + sv * m02) / det;
  if (Math.hypot(b, c) > maxSlope) return false;
  // Residual sum of squares of the fit: Σv² − (a·Σv + b·Σv·dx + c·Σv·dy).
  const rss = Math.max(0, svv - (a * sv + b * svx + c * svy));
  const rms = Math.sqrt(rss / Math.max(1, n - 3));
  if (rms > maxRms) return false;
  return Math.abs(t - origin - a) <= Math.max(3 * rms, minTolerance);
}
