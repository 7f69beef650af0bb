/**
 * Decides whether a light is a single spectral line, and at which wavelength.
 *
 * A light counts as monochromatic when it is a `line:<nm>` spec, or when its spectral power
 * distribution packs most of its power (90 %, our choice) into a window narrower than 20 nm
 * (common practice: mercury and sodium lines, laser lines and interference-filtered LEDs pass,
 * bare LEDs with 20–40 nm bandwidth do not). The line wavelength of a narrow SPD is its
 * power-weighted centroid inside that window.
 *
 * The window is found on the trapezoidal cumulative power, so a line sampled as one non-zero
 * value on a coarse grid counts as narrow (its width comes out as about one grid step).
 */

/** A sampled spectral power distribution (relative power at ascending wavelengths). */
export interface SampledSpd {
  readonly wavelengthsNm: ArrayLike<number>;
  readonly values: ArrayLike<number>;
}

export const LINE_RANGE_NM: readonly [number, number] = [380, 780];
/** Share of the power that must fit in the window. */
export const LINE_POWER_SHARE = 0.9;
/** Widest window (nm) still treated as one line. */
export const LINE_MAX_WIDTH_NM = 20;

/** Throws a RangeError unless 380 <= lineNm <= 780. */
export function checkLineWavelength(lineNm: number, name = 'lineNm'): number {
  if (!Number.isFinite(lineNm) || lineNm < LINE_RANGE_NM[0] || lineNm > LINE_RANGE_NM[1]) {
    throw new RangeError(
      `${name} must be a wavelength between ${LINE_RANGE_NM[0]} and ${LINE_RANGE_NM[1]} nm (visible light), received ${lineNm}`,
    );
  }
  return lineNm;
}

/** Narrowest window holding `share` of the power: { fromNm, toNm, centroidNm }. */
export function narrowestPowerWindow(
  spd: SampledSpd,
  share = LINE_POWER_SHARE,
): { fromNm: number; toNm: number; centroidNm: number } | null {
  const wl = spd.wavelengthsNm;
  const v = spd.values;
  const n = wl.length;
  if (n !== v.length) {
    throw new RangeError(`SPD wavelengthsNm and values must have the same length, received ${n} and ${v.length}`);
  }
  const cum = new Float64Array(n);
  for (let i = 1; i < n; i++) {
    if (!(wl[i] > wl[i - 1])) throw new RangeError(`SPD wavelengthsNm must ascend, received ${wl[i - 1]} then ${wl[i]}`);
    cum[i] = cum[i - 1] + 0.5 * (Math.max(0, v[i]) + Math.max(0, v[i - 1])) * (wl[i] - wl[i - 1]);
  }
  const total = n > 0 ? cum[n - 1] : 0;
  if (!(total > 0)) return null;
  const need = share * total;
  // Wavelength at which the cumulative power reaches `target` (linear within a step).
  const atPower = (target: number): number => {
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (cum[mid] < target) lo = mid;
      else hi = mid;
    }
    const span = cum[hi] - cum[lo];
    return span > 0 ? wl[lo] + ((target - cum[lo]) / span) * (wl[hi] - wl[lo]) : wl[lo];
  };
  let best = { fromNm: wl[0], toNm: wl[n - 1] };
  // Windows starting at each sample and at each power fraction step cover the optimum closely.
  const steps = 200;
  for (let i = 0; i <= steps; i++) {
    const startPower = ((total - need) * i) / steps;
    const fromNm = atPower(startPower);
    const toNm = atPower(startPower + need);
    if (toNm - fromNm < best.toNm - best.fromNm) best = { fromNm, toNm };
  }
  let weighted = 0;
  let power = 0;
  for (let i = 0; i < n; i++) {
    if (wl[i] < best.fromNm - 1e-9 || wl[i] > best.toNm + 1e-9) continue;
    weighted += Math.max(0, v[i]) * wl[i];
    power += Math.max(0, v[i]);
  }
  const centroidNm = power > 0 ? weighted / power : 0.5 * (best.fromNm + best.toNm);
  return { ...best, centroidNm };
}

/**
 * Line wavelength (nm) of a monochromatic light, or null for a broadband one.
 * Accepts a light spec string (`line:546`, `line:589.3`; other names return null) or a sampled
 * SPD. Throws RangeError for a line outside 380–780 nm.
 */
export function isMonochromaticLight(light: string | SampledSpd): number | null {
  if (typeof light === 'string') {
    const match = /^\s*line\s*:\s*(.*)$/i.exec(light);
    if (!match) return null;
    const value = Number(match[1].trim().replace(/nm$/i, ''));
    if (match[1].trim() === '' || !Number.isFinite(value)) {
      throw new RangeError(`light line:<nm> needs a wavelength in nm, e.g. line:546, received '${light}'`);
    }
    return checkLineWavelength(value, `light ${light.trim()}`);
  }
  if (light === null || typeof light !== 'object' || !('wavelengthsNm' in light) || !('values' in light)) {
    throw new TypeError(`light must be a spec string or an SPD { wavelengthsNm, values }, received ${String(light)}`);
  }
  const window = narrowestPowerWindow(light);
  if (window === null) throw new RangeError('light SPD must carry some positive power, received all zeros');
  if (window.toNm - window.fromNm >= LINE_MAX_WIDTH_NM) return null;
  return checkLineWavelength(window.centroidNm, 'light SPD centre wavelength');
}
