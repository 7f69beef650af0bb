/**
 * Summary numbers of one velocity field (one frame pair), over the cells with a confident vector:
 * mean and 95th-percentile speed, mean velocity components, mean divergence and vorticity, mean
 * thinning rate, and coverage. Units: velocities in the field's unit per second (px/s, or µm/s
 * with a pixel size), divergence and vorticity in 1/s (independent of the length unit), thinning
 * in nm/s. Image rows grow downwards; `meanUpPerS` is the vertical velocity with up positive (the
 * way a film rises against gravity), and the vorticity is counter-clockwise positive as seen on
 * the image: ω = −(∂v/∂x − ∂u/∂y) with v along the rows.
 */

export interface FlowSummary {
  /** Cells with a confident vector / cells with a thickness in the first frame (0…1). */
  readonly coverage: number;
  readonly vectors: number;
  readonly meanSpeedPerS: number | null;
  readonly p95SpeedPerS: number | null;
  readonly meanVxPerS: number | null;
  readonly meanUpPerS: number | null;
  readonly meanDivergencePerS: number | null;
  readonly meanVorticityPerS: number | null;
  readonly rmsVorticityPerS: number | null;
  readonly meanThinningNmPerS: number | null;
}

/**
 * `vx`, `vy` per second in the length unit of `lengthPerPx` (1 for px), NaN where unknown;
 * `changeNmPerS` the thickness change rate. `known` cells counted for coverage are the finite
 * cells of `firstFrame`.
 */
export function summariseFlow(
  vx: Float32Array, vy: Float32Array, changeNmPerS: Float32Array, firstFrame: Float32Array, width: number, height: number, lengthPerPx: number,
): FlowSummary {
  const n = width * height;
  let film = 0;
  let count = 0;
  let sx = 0;
  let sy = 0;
  let ss = 0;
  let sc = 0;
  let nc = 0;
  const speeds = new Float32Array(n);
  for (let i = 0; i < n; i++) {
    if (Number.isFinite(firstFrame[i])) film++;
    const a = vx[i];
    const b = vy[i];
    if (!Number.isFinite(a) || !Number.isFinite(b)) continue;
    const s = Math.hypot(a, b);
    speeds[count++] = s;
    sx += a;
    sy += b;
    ss += s;
    if (Number.isFinite(changeNmPerS[i])) {
      sc += changeNmPerS[i];
      nc++;
    }
  }
  // Divergence and vorticity by central differences where both neighbours have a vector.
  let sd = 0;
  let sw = 0;
  let sw2 = 0;
  let nd = 0;
  for (let y = 1; y < height - 1; y++) {
    for (let x = 1; x < width - 1; x++) {
      const i = y * width + x;
      const ul = vx[i - 1], ur = vx[i + 1], ut = vx[i - width], ub = vx[i + width];
      const vl = vy[i - 1], vr = vy[i + 1], vt = vy[i - width], vb = vy[i + width];
      if (!(Number.isFinite(ul) && Number.isFinite(ur) && Number.isFinite(ut) && Number.isFinite(ub) && Number.isFinite(vl) && Number.isFinite(vr) && Number.isFinite(vt) && Number.isFinite(vb))) continue;
      const dudx = (ur - ul) / (2 * lengthPerPx);
      const dudy = (ub - ut) / (2 * lengthPerPx);
      const dvdx = (vr - vl) / (2 * lengthPerPx);
      const dvdy = (vb - vt) / (2 * lengthPerPx);
      const omega = -(dvdx - dudy);
      sd += dudx + dvdy;
      sw += omega;
      sw2 += omega * omega;
      nd++;
    }
  }
  const sorted = speeds.subarray(0, count).sort();
  return {
    coverage: film === 0 ? 0 : count / film,
    vectors: count,
    meanSpeedPerS: count === 0 ? null : ss / count,
    p95SpeedPerS: count === 0 ? null : sorted[Math.min(count - 1, Math.floor(0.95 * count))],
    meanVxPerS: count === 0 ? null : sx / count,
    meanUpPerS: count === 0 ? null : -sy / count,
    meanDivergencePerS: nd === 0 ? null : sd / nd,
    meanVorticityPerS: nd === 0 ? null : sw / nd,
    rmsVorticityPerS: nd === 0 ? null : Math.sqrt(sw2 / nd),
    meanThinningNmPerS: nc === 0 ? null : sc / nc,
  };
}
