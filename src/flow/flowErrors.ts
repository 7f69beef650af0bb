/**
 * Flow error measures of Baker, Scharstein, Lewis, Roth, Black & Szeliski 2011, "A Database and
 * Evaluation Methodology for Optical Flow", IJCV 92:1–31, section 4.1:
 *   endpoint error  EE = √((u − u_GT)² + (v − v_GT)²)                                  (px)
 *   angular error   AE = arccos((1 + u·u_GT + v·v_GT) / (√(1 + u² + v²) · √(1 + u_GT² + v_GT²)))
 * (the angle between the space-time vectors (u, v, 1) and (u_GT, v_GT, 1), Fleet & Jepson 1990).
 * Also the plain direction error in the image plane, the angle between (u, v) and (u_GT, v_GT),
 * which is what "direction within 5°" means for motions faster than 1 px per frame.
 */

export function endpointErrorPx(u: number, v: number, uTrue: number, vTrue: number): number {
  return Math.hypot(u - uTrue, v - vTrue);
}

export function angularErrorRad(u: number, v: number, uTrue: number, vTrue: number): number {
  const c = (1 + u * uTrue + v * vTrue) / (Math.sqrt(1 + u * u + v * v) * Math.sqrt(1 + uTrue * uTrue + vTrue * vTrue));
  return Math.acos(Math.min(1, Math.max(-1, c)));
}

/** Angle between the two image-plane vectors, rad (0…π); NaN when either is zero. */
export function directionErrorRad(u: number, v: number, uTrue: number, vTrue: number): number {
  const a = Math.hypot(u, v);
  const b = Math.hypot(uTrue, vTrue);
  if (a === 0 || b === 0) return NaN;
  return Math.acos(Math.min(1, Math.max(-1, (u * uTrue + v * vTrue) / (a * b))));
}

export interface FlowErrorSummary {
  /** Cells compared (finite estimate, inside the mask). */
  readonly count: number;
  readonly meanEndpointPx: number;
  readonly p95EndpointPx: number;
  readonly meanAngularDeg: number;
  /** Mean direction error over the compared cells whose true speed exceeds `minSpeedPx`. */
  readonly meanDirectionDeg: number;
  /** Largest direction error over those cells. */
  readonly p95DirectionDeg: number;
}

/** Summary of the errors over the cells where `mask` is set (all when null) and the estimate is finite. */
export function summariseFlowErrors(
  u: Float32Array, v: Float32Array, uTrue: Float32Array, vTrue: Float32Array, mask: Uint8Array | null, minSpeedPx = 1,
): FlowErrorSummary {
  const ee: number[] = [];
  const dir: number[] = [];
  let ae = 0;
  for (let i = 0; i < u.length; i++) {
    if (mask && !mask[i]) continue;
    if (!Number.isFinite(u[i]) || !Number.isFinite(v[i])) continue;
    ee.push(endpointErrorPx(u[i], v[i], uTrue[i], vTrue[i]));
    ae += angularErrorRad(u[i], v[i], uTrue[i], vTrue[i]);
    if (Math.hypot(uTrue[i], vTrue[i]) > minSpeedPx) dir.push(directionErrorRad(u[i], v[i], uTrue[i], vTrue[i]));
  }
  const deg = 180 / Math.PI;
  const p95 = (xs: number[]): number => {
    if (xs.length === 0) return NaN;
    const s = Float64Array.from(xs).sort();
    return s[Math.min(s.length - 1, Math.floor(0.95 * s.length))];
  };
  const mean = (xs: number[]): number => (xs.length === 0 ? NaN : xs.reduce((a, b) => a + b, 0) / xs.length);
  return {
    count: ee.length,
    meanEndpointPx: mean(ee),
    p95EndpointPx: p95(ee),
    meanAngularDeg: ee.length === 0 ? NaN : (ae / ee.length) * deg,
    meanDirectionDeg: mean(dir) * deg,
    p95DirectionDeg: p95(dir) * deg,
  };
}
