/**
 * Colour differences between two CIELAB colours.
 * - ΔE*ab (CIE76): Euclidean distance, CIE 15:2004 §8.2.1.3.
 * - CIEDE2000: CIE 142-2001; implemented after the equations and implementation notes of
 *   G. Sharma, W. Wu, E. N. Dalal, Color Res. Appl. 30(1), 21–30 (2005), doi:10.1002/col.20070
 *   (mean hue rule for |h1 − h2| > 180°, hue of achromatic colours taken as 0, and
 *   the mean hue of a pair with a zero chroma equal to the sum of hues, as in their eqs. 7–14).
 * `createDeltaE2000({ kL, kC, kH })` binds the parametric factors once and returns a fast
 * two-argument function.
 */

export type LabLike = ArrayLike<number>;

export function deltaE76(reference: LabLike, sample: LabLike): number {
  return Math.hypot(reference[0] - sample[0], reference[1] - sample[1], reference[2] - sample[2]);
}

export interface DeltaE2000Weights {
  readonly kL?: number;
  readonly kC?: number;
  readonly kH?: number;
}

const DEG = Math.PI / 180;
const POW25_7 = 25 ** 7;

export function createDeltaE2000(weights: DeltaE2000Weights = {}): (reference: LabLike, sample: LabLike) => number {
  const kL = weights.kL ?? 1;
  const kC = weights.kC ?? 1;
  const kH = weights.kH ?? 1;
  for (const [name, value] of [['kL', kL], ['kC', kC], ['kH', kH]] as const) {
    if (!Number.isFinite(value) || value <= 0) throw new RangeError(`${name} must be a finite number > 0, received ${value}`);
  }
  return (reference, sample) => {
    const L1 = reference[0], a1 = reference[1], b1 = reference[2];
    const L2 = sample[0], a2 = sample[1], b2 = sample[2];
    const C1 = Math.hypot(a1, b1);
    const C2 = Math.hypot(a2, b2);
    const meanC7 = ((C1 + C2) / 2) ** 7;
    const G = 0.5 * (1 - Math.sqrt(meanC7 / (meanC7 + POW25_7)));
    const a1p = (1 + G) * a1;
    const a2p = (1 + G) * a2;
    const C1p = Math.hypot(a1p, b1);
    const C2p = Math.hypot(a2p, b2);
    const h1p = C1p === 0 ? 0 : hueDeg(b1, a1p);
    const h2p = C2p === 0 ? 0 : hueDeg(b2, a2p);

    const dLp = L2 - L1;
    const dCp = C2p - C1p;
    let dhp = 0;
    if (C1p * C2p !== 0) {
      dhp = h2p - h1p;
      if (dhp > 180) dhp -= 360;
      else if (dhp < -180) dhp += 360;
    }
    const dHp = 2 * Math.sqrt(C1p * C2p) * Math.sin((dhp / 2) * DEG);

    const meanLp = (L1 + L2) / 2;
    const meanCp = (C1p + C2p) / 2;
    let meanHp: number;
    if (C1p * C2p === 0) meanHp = h1p + h2p;
    else if (Math.abs(h1p - h2p) <= 180) meanHp = (h1p + h2p) / 2;
    else if (h1p + h2p < 360) meanHp = (h1p + h2p + 360) / 2;
    else meanHp = (h1p + h2p - 360) / 2;

    const T =
      1 -
      0.17 * Math.cos((meanHp - 30) * DEG) +
      0.24 * Math.cos(2 * meanHp * DEG) +
      0.32 * Math.cos((3 * meanHp + 6) * DEG) -
      0.2 * Math.cos((4 * meanHp - 63) * DEG);
    const dTheta = 30 * Math.exp(-(((meanHp - 275) / 25) ** 2));
    const meanCp7 = meanCp ** 7;
    const RC = 2 * Math.sqrt(meanCp7 / (meanCp7 + POW25_7));
    const lTerm = (meanLp - 50) ** 2;
    const SL = 1 + (0.015 * lTerm) / Math.sqrt(20 + lTerm);
    const SC = 1 + 0.045 * meanCp;
    const SH = 1 + 0.015 * meanCp * T;
    const RT = -Math.sin(2 * dTheta * DEG) * RC;

    const l = dLp / (kL * SL);
    const c = dCp / (kC * SC);
    const h = dHp / (kH * SH);
    return Math.sqrt(l * l + c * c + h * h + RT * c * h);
  };
}

function hueDeg(b: number, a: number): number {
  const h = Math.atan2(b, a) / DEG;
  return h < 0 ? h + 360 : h;
}

/** CIEDE2000 with kL = kC = kH = 1 (reference conditions). */
export const deltaE2000 = createDeltaE2000();
