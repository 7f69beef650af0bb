import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { sharedPath } from '../src/data/sharedDir.js';
import {
  airyFreeFilmReflectance,
  freeFilmPeakReflectance,
  fresnelAmplitudeNormal,
  scheludkoThicknessNm,
} from '../src/mono/scheludko.js';
import { filmSpectra } from '../src/optics/filmSpectra.js';
import { getMaterial } from '../src/optics/materialLibrary.js';
import { resolveStack } from '../src/optics/resolveStack.js';

/** Row `id` of shared/refdata/worked_examples.csv (value column). */
function workedExample(id: string): number {
  const lines = readFileSync(sharedPath('refdata', 'worked_examples.csv'), 'utf8').split('\n');
  const row = lines.find((line) => line.startsWith(`${id},`));
  if (!row) throw new Error(`worked example ${id} missing`);
  // value is the 4th field; conditions (3rd) is quoted and may hold commas.
  const match = /^[^,]+,[^,]+,"[^"]*",([^,]+),/.exec(row) ?? /^[^,]+,[^,]+,[^,]+,([^,]+),/.exec(row);
  return Number(match![1]);
}

/**
 * Independent check of the Airy formula: sum the reflected partial waves of a free film one by
 * one (amplitudes r, t t' r' e^{2iδ}, …; Stokes relations t t' = 1 − r², r' = −r; common practice)
 * instead of using the closed form.
 */
function partialWaveSum(thicknessNm: number, wavelengthNm: number, n: number): number {
  const r = (1 - n) / (1 + n);
  const delta = (2 * Math.PI * n * thicknessNm) / wavelengthNm;
  let re = r;
  let im = 0;
  let ampl = (1 - r * r) * -r; // first internally reflected wave leaving the film
  for (let k = 1; k < 400; k++) {
    re += ampl * Math.cos(2 * k * delta);
    im += ampl * Math.sin(2 * k * delta);
    ampl *= r * r;
  }
  return re * re + im * im;
}

describe('airyFreeFilmReflectance() against a direct partial-wave sum (derivation check)', () => {
  it('agrees to 1e-12 for many thicknesses at 546 nm, n = 1.333', () => {
    for (let h = 0; h <= 1200; h += 7.3) {
      expect(airyFreeFilmReflectance(h, 546, 1.333)).toBeCloseTo(partialWaveSum(h, 546, 1.333), 12);
    }
  });
});

describe('scheludkoThicknessNm() inverts the Airy formula', () => {
  const lineNm = 546.07;
  const n = 1.3345;
  const quarterNm = lineNm / (4 * n);
  it('returns h on rising and falling branches of orders 0–3 to 1e-9 nm', () => {
    const rMax = freeFilmPeakReflectance(n);
    for (let branch = 0; branch < 7; branch++) {
      for (let f = 0.02; f < 1; f += 0.07) {
        const h = (branch + f) * quarterNm;
        const delta = airyFreeFilmReflectance(h, lineNm, n) / rMax;
        const rising = branch % 2 === 0;
        const order = rising ? branch / 2 : (branch + 1) / 2;
        const back = scheludkoThicknessNm(delta, { wavelengthNm: lineNm, filmIndex: n, order, branch: rising ? 'rising' : 'falling' });
        expect(back).toBeCloseTo(h, 9);
      }
    }
  });
  it('gives the quarter-wave thickness at Δ = 1 and zero at Δ = 0 of order 0', () => {
    expect(scheludkoThicknessNm(1, { wavelengthNm: lineNm, filmIndex: n, order: 0, branch: 'rising' })).toBeCloseTo(quarterNm, 9);
    expect(scheludkoThicknessNm(0, { wavelengthNm: lineNm, filmIndex: n, order: 0, branch: 'rising' })).toBe(0);
  });
  it('clamps Δ outside [0, 1] (noise beyond the extremes)', () => {
    const opts = { wavelengthNm: lineNm, filmIndex: n, order: 1, branch: 'falling' as const };
    expect(scheludkoThicknessNm(1.04, opts)).toBeCloseTo(quarterNm, 9);
    expect(scheludkoThicknessNm(-0.02, opts)).toBeCloseTo(2 * quarterNm, 9);
  });
  it('rejects a falling branch of order 0, a non-integer order and NaN with messages', () => {
    expect(() => scheludkoThicknessNm(0.5, { wavelengthNm: 546, filmIndex: n, order: 0, branch: 'falling' })).toThrow(/order must be >= 1 on a falling branch/);
    expect(() => scheludkoThicknessNm(0.5, { wavelengthNm: 546, filmIndex: n, order: 1.5, branch: 'rising' })).toThrow(/order must be an integer >= 0, received 1.5/);
    expect(() => scheludkoThicknessNm(NaN, { wavelengthNm: 546, filmIndex: n, order: 0, branch: 'rising' })).toThrow(RangeError);
    expect(() => airyFreeFilmReflectance(100, 546, 0.9)).toThrow(/filmIndex must be a finite number > 1, received 0.9/);
  });
});

describe('quarter-wave limit (worked example WE12, shared/refdata/worked_examples.csv)', () => {
  // WE12: free water film, n = 1.33, d = λ/(4n): R = 4r²/(1 + r²)² = 7.71 % (printed to 0.01 %).
  it('peak reflectance for n = 1.33 is 7.71 % to the printed precision', () => {
    const expected = workedExample('WE12');
    expect(expected).toBe(7.71);
    expect(100 * freeFilmPeakReflectance(1.33)).toBeCloseTo(expected, 2);
  });
  it('R(h) rises monotonically to the peak as h → λ/(4n) and reaches it there', () => {
    const n = 1.33;
    const q = 550 / (4 * n);
    let last = -1;
    for (const f of [0.5, 0.8, 0.9, 0.99, 0.999, 1]) {
      const R = airyFreeFilmReflectance(f * q, 550, n);
      expect(R).toBeGreaterThan(last);
      last = R;
    }
    expect(last).toBeCloseTo(freeFilmPeakReflectance(n), 14);
  });
  it('peak reflectance follows from the single-surface Fresnel reflectance (WE11: 2.04 % for n = 1.333)', () => {
    // WE11 (worked_examples.csv): one water surface reflects r² = 2.04 % at normal incidence.
    const single = fresnelAmplitudeNormal(1.333) ** 2;
    expect(100 * single).toBeCloseTo(workedExample('WE11'), 2);
    expect(freeFilmPeakReflectance(1.333)).toBeCloseTo((4 * single) / (1 + single) ** 2, 14);
  });
});

describe('Airy free film against our transfer-matrix filmSpectra (soap-film preset at 546.07 nm)', () => {
  it('agrees to 1e-9 at normal incidence with the water index of Daimon & Masumura 2007', () => {
    const stack = resolveStack('soap-film');
    const lineNm = 546.07;
    // The preset's ambient is standard air (n ≈ 1.00027); the Airy formula assumes vacuum-like air,
    // so compare with the relative index n_water / n_air.
    const nWater = getMaterial('water').indexAt(lineNm).n;
    const nAir = getMaterial('air').indexAt(lineNm).n;
    const thicknessesNm = Float64Array.from({ length: 60 }, (_, i) => i * 15);
    const R = filmSpectra(stack, { wavelengthsNm: Float64Array.of(lineNm), thicknessesNm, angleRad: 0, polarisation: 'mixed' }).reflectance;
    for (let i = 0; i < thicknessesNm.length; i++) {
      const airy = airyFreeFilmReflectance(thicknessesNm[i] * nAir, lineNm, nWater / nAir);
      expect(R[i]).toBeCloseTo(airy, 9);
    }
  });
});
