/**
 * Transfer-matrix engine (src/optics/filmSpectra.ts) against textbook results and the worked
 * examples in shared/refdata/worked_examples.csv (ids WE.., sources in shared/refdata/sources.csv).
 * Tolerances follow the digits printed by the source (e.g. 4.00 % -> ±0.005 %).
 */
import { describe, expect, it } from 'vitest';
import { airyFilm } from '../src/optics/airyFilm.js';
import { filmSpectra } from '../src/optics/filmSpectra.js';
import { constantMaterial } from '../src/optics/material.js';
import { getMaterial } from '../src/optics/materialLibrary.js';
import { stackSpectrum } from '../src/optics/stackSpectrum.js';
import type { Material, Polarisation, Stack } from '../src/optics/types.js';

const air = constantMaterial(1);
const c = (n: number, k = 0): Material => constantMaterial(n, k);

function singleFilm(film: Material, substrate: Material, ambient: Material = air): Stack {
  return { name: 'test', ambient, layers: [{ material: film, thicknessNm: 'film' }], substrate };
}

function R(stack: Stack, thicknessNm: number, wavelengthNm: number, angleRad = 0, polarisation: Polarisation = 'mixed'): number {
  return stackSpectrum(stack, thicknessNm, Float64Array.of(wavelengthNm), angleRad, polarisation).reflectance[0];
}

describe('worked examples (shared/refdata/worked_examples.csv)', () => {
  it('WE01 (Hecht, Optics, from memory; Fresnel formula): bare glass n=1.50 at normal incidence reflects 4.00 %', () => {
    // zero-thickness film = bare interface
    expect(R(singleFilm(c(1.5), c(1.5)), 0, 550) * 100).toBeCloseTo(4.0, 2);
  });
  it('WE02 (computed from Fresnel formula): bare crown glass n=1.52 reflects 4.26 %', () => {
    expect(Math.abs(R(singleFilm(c(1.38), c(1.52)), 0, 550) * 100 - 4.26)).toBeLessThan(0.005);
  });
  it('WE04 (astronomyclub appendix, computed): quarter-wave MgF2 n=1.38 on crown glass 1.52 at 550 nm leaves 1.26 %', () => {
    const d = 550 / (4 * 1.38); // WE03: 99.64 nm
    expect(d).toBeCloseTo(99.64, 2);
    expect(Math.abs(R(singleFilm(c(1.38), c(1.52)), d, 550) * 100 - 1.26)).toBeLessThan(0.005);
  });
  it('WE05 (computed): quarter-wave MgF2 on glass 1.50 leaves 1.41 %', () => {
    expect(Math.abs(R(singleFilm(c(1.38), c(1.5)), 550 / (4 * 1.38), 550) * 100 - 1.41)).toBeLessThan(0.005);
  });
  it('WE08 (Green 2008 n,k): bare Si at 632.8 nm with n=3.874, k=0.0162 reflects 34.77 %', () => {
    expect(Math.abs(R(singleFilm(c(1.46), c(3.874, 0.0162)), 0, 632.8) * 100 - 34.77)).toBeLessThan(0.005);
  });
  it('WE08 with the library table (Green 2008 interpolated at 632.8 nm) also gives 34.77 %', () => {
    const si = getMaterial('si');
    expect(Math.abs(R(singleFilm(c(1.46), si), 0, 632.8) * 100 - 34.77)).toBeLessThan(0.01);
  });
  it('WE09 (Green 2008): bare Si at 550 nm, n=4.077, k=0.0280 reflects 36.73 %', () => {
    expect(Math.abs(R(singleFilm(c(1.46), c(4.077, 0.028)), 0, 550) * 100 - 36.73)).toBeLessThan(0.005);
  });
  it('WE10 (Green 2008, Airy formula): quarter-wave SiO2 n=1.46 on Si (4.077+0.028i) at 550 nm gives 9.82 %', () => {
    expect(Math.abs(R(singleFilm(c(1.46), c(4.077, 0.028)), 550 / (4 * 1.46), 550) * 100 - 9.82)).toBeLessThan(0.005);
  });
  it('WE11 (computed): single water surface n=1.333 reflects 2.04 %', () => {
    expect(Math.abs(R(singleFilm(c(1.333), c(1.333)), 0, 550) * 100 - 2.04)).toBeLessThan(0.005);
  });
  it('WE12 (computed): free water film n=1.33 at d=λ/(4n) peaks at 7.71 %', () => {
    expect(Math.abs(R(singleFilm(c(1.33), air), 550 / (4 * 1.33), 550) * 100 - 7.71)).toBeLessThan(0.005);
  });
});

describe('angles and polarisation (common practice / Hecht, Optics, from memory)', () => {
  it('filmSpectra() gives Rp = 0 at the Brewster angle atan(1.5) = 56.31° for n = 1.5', () => {
    const brewster = Math.atan(1.5);
    expect((brewster * 180) / Math.PI).toBeCloseTo(56.31, 2);
    const stack = singleFilm(c(1.5), c(1.5));
    expect(R(stack, 0, 550, brewster, 'p')).toBeLessThan(1e-20);
    expect(R(stack, 0, 550, brewster, 's')).toBeGreaterThan(0.1);
  });
  it('Fresnel s and p at 45° on n=1.5 equal the closed forms (Born & Wolf §1.5.2)', () => {
    const t0 = Math.PI / 4;
    const t1 = Math.asin(Math.sin(t0) / 1.5);
    const rs = Math.sin(t0 - t1) / Math.sin(t0 + t1);
    const rp = Math.tan(t0 - t1) / Math.tan(t0 + t1);
    const stack = singleFilm(c(1.5), c(1.5));
    expect(R(stack, 0, 500, t0, 's')).toBeCloseTo(rs * rs, 12);
    expect(R(stack, 0, 500, t0, 'p')).toBeCloseTo(rp * rp, 12);
    expect(R(stack, 0, 500, t0, 'mixed')).toBeCloseTo((rs * rs + rp * rp) / 2, 12);
  });
  it('s equals p at normal incidence for an absorbing multilayer', () => {
    const stack: Stack = {
      name: 't', ambient: air,
      layers: [{ material: c(2.0, 0.05), thicknessNm: 40 }, { material: c(1.46), thicknessNm: 'film' }],
      substrate: c(3.9, 0.02),
    };
    const wl = Float64Array.of(400, 550, 700);
    const s = stackSpectrum(stack, 123, wl, 0, 's');
    const p = stackSpectrum(stack, 123, wl, 0, 'p');
    for (let j = 0; j < 3; j++) {
      expect(s.reflectance[j]).toBeCloseTo(p.reflectance[j], 14);
      expect(s.transmittance[j]).toBeCloseTo(p.transmittance[j], 14);
    }
  });
  it('total internal reflection: glass 1.5 → air beyond 41.8° reflects everything, with T = 0', () => {
    const stack = singleFilm(c(1.2), air, c(1.5));
    for (const pol of ['s', 'p'] as const) {
      const out = stackSpectrum(stack, 80, Float64Array.of(550), (50 * Math.PI) / 180, pol);
      expect(out.reflectance[0]).toBeCloseTo(1, 12);
      expect(out.transmittance[0]).toBeCloseTo(0, 12);
    }
  });
});

describe('identities of the matrix method', () => {
  const lossless: Stack = {
    name: 't', ambient: air,
    layers: [{ material: c(2.3), thicknessNm: 60 }, { material: c(1.38), thicknessNm: 'film' }, { material: c(1.8), thicknessNm: 200 }],
    substrate: c(1.52),
  };
  it('R + T = 1 for a lossless stack at several angles and both polarisations', () => {
    const wl = Float64Array.from({ length: 41 }, (_, i) => 380 + i * 10);
    const d = Float64Array.of(0, 37, 250, 1234);
    for (const deg of [0, 20, 45, 70, 85]) {
      for (const polarisation of ['s', 'p', 'mixed'] as const) {
        const out = filmSpectra(lossless, { wavelengthsNm: wl, thicknessesNm: d, angleRad: (deg * Math.PI) / 180, polarisation });
        for (let i = 0; i < out.reflectance.length; i++) {
          expect(out.reflectance[i] + out.transmittance[i]).toBeCloseTo(1, 12);
        }
      }
    }
  });
  it('R + T = 1 into a denser substrate at oblique incidence (checks the admittance ratio in T)', () => {
    const stack = singleFilm(c(2.1), c(3.5), c(1.33));
    for (const polarisation of ['s', 'p'] as const) {
      const out = stackSpectrum(stack, 150, Float64Array.of(450, 600), 1.0, polarisation);
      expect(out.reflectance[0] + out.transmittance[0]).toBeCloseTo(1, 12);
      expect(out.reflectance[1] + out.transmittance[1]).toBeCloseTo(1, 12);
    }
  });
  it('single film: the matrix method equals the Airy formula (absorbing film and substrate, oblique)', () => {
    const film = { n: 2.2, k: 0.03 };
    const sub = { n: 3.9, k: 0.02 };
    const stack = singleFilm(c(film.n, film.k), c(sub.n, sub.k), c(1.33));
    const wl = Float64Array.of(400, 523.7, 700);
    const d = Float64Array.of(0, 12.5, 333, 2000);
    for (const polarisation of ['s', 'p'] as const) {
      const out = filmSpectra(stack, { wavelengthsNm: wl, thicknessesNm: d, angleRad: 0.6, polarisation });
      for (let i = 0; i < d.length; i++) {
        for (let j = 0; j < wl.length; j++) {
          const ref = airyFilm(1.33, film, sub, d[i], wl[j], 0.6, polarisation);
          expect(out.reflectance[i * 3 + j]).toBeCloseTo(ref.reflectance, 12);
          expect(out.transmittance[i * 3 + j]).toBeCloseTo(ref.transmittance, 12);
        }
      }
    }
  });
  it('a half-wave layer is absent: R equals the bare substrate (Macleod ch. 3)', () => {
    const half = 550 / (2 * 1.38);
    const withLayer = R(singleFilm(c(1.38), c(1.52)), half, 550);
    const bare = ((1.52 - 1) / (1.52 + 1)) ** 2;
    expect(withLayer).toBeCloseTo(bare, 14);
  });
  it('continuity: R → bare interface as thickness → 0', () => {
    const stack = singleFilm(c(2.0, 0.1), c(3.9, 0.02));
    const bare = R(stack, 0, 500);
    const tiny = R(stack, 1e-6, 500);
    expect(Math.abs(tiny - bare)).toBeLessThan(1e-7);
    expect(bare).toBeCloseTo(((3.9 - 1) ** 2 + 0.02 ** 2) / ((3.9 + 1) ** 2 + 0.02 ** 2), 14);
  });
  it('a free film at normal incidence is symmetric: same R and T from either side', () => {
    const inner = c(1.8, 0.02);
    const a: Stack = { name: 'a', ambient: air, layers: [{ material: c(1.5), thicknessNm: 80 }, { material: inner, thicknessNm: 'film' }], substrate: air };
    const b: Stack = { name: 'b', ambient: air, layers: [{ material: inner, thicknessNm: 'film' }, { material: c(1.5), thicknessNm: 80 }], substrate: air };
    const wl = Float64Array.of(420, 610);
    const ta = stackSpectrum(a, 140, wl, 0, 's');
    const tb = stackSpectrum(b, 140, wl, 0, 's');
    for (let j = 0; j < 2; j++) expect(ta.transmittance[j]).toBeCloseTo(tb.transmittance[j], 13);
    const sym = singleFilm(c(1.33), air);
    const sa = stackSpectrum(sym, 300, wl, 0, 'mixed');
    expect(sa.reflectance[0] + sa.transmittance[0]).toBeCloseTo(1, 13);
  });
  it('two film layers take the same thickness; matches one layer of double thickness', () => {
    const two: Stack = { name: 't', ambient: air, layers: [{ material: c(1.6), thicknessNm: 'film' }, { material: c(1.6), thicknessNm: 'film' }], substrate: c(1.5) };
    const one = singleFilm(c(1.6), c(1.5));
    expect(R(two, 100, 500, 0.3, 's')).toBeCloseTo(R(one, 200, 500, 0.3, 's'), 13);
  });
  it('filmSpectra() layout is [thickness i * W + wavelength j]', () => {
    const stack = singleFilm(c(1.33), air);
    const wl = Float64Array.of(450, 550, 650);
    const d = Float64Array.of(100, 200);
    const out = filmSpectra(stack, { wavelengthsNm: wl, thicknessesNm: d, angleRad: 0, polarisation: 'mixed' });
    expect(out.reflectance[1 * 3 + 2]).toBeCloseTo(R(stack, 200, 650), 15);
    expect(out.reflectance[0 * 3 + 1]).toBeCloseTo(R(stack, 100, 550), 15);
  });
  it('filmIndexScale multiplies the film index: n=1.30×1.1 equals n=1.43', () => {
    const wl = Float64Array.of(500);
    const d = Float64Array.of(250);
    const a = filmSpectra(singleFilm(c(1.3), c(1.52)), { wavelengthsNm: wl, thicknessesNm: d, angleRad: 0.2, polarisation: 'p', filmIndexScale: 1.1 });
    const b = filmSpectra(singleFilm(c(1.43), c(1.52)), { wavelengthsNm: wl, thicknessesNm: d, angleRad: 0.2, polarisation: 'p' });
    expect(a.reflectance[0]).toBeCloseTo(b.reflectance[0], 14);
  });
});

describe('incoherent thick substrate (intensity addition; common practice)', () => {
  it('bare glass slide n=1.5 in air: R = 2r/(1+r) = 7.69 %, T = (1−r)/(1+r)', () => {
    const stack: Stack = { ...singleFilm(c(1.5), c(1.5)), incoherentBack: { exitMedium: air } };
    const out = stackSpectrum(stack, 0, Float64Array.of(550), 0, 'mixed');
    const r = 0.04;
    expect(out.reflectance[0]).toBeCloseTo((2 * r) / (1 + r), 14);
    expect(out.transmittance[0]).toBeCloseTo((1 - r) / (1 + r), 14);
  });
  it('lossless coated slide at 40°: R + T = 1 for s and p', () => {
    const stack: Stack = { ...singleFilm(c(2.1), c(1.52)), incoherentBack: { exitMedium: air } };
    for (const pol of ['s', 'p'] as const) {
      const out = stackSpectrum(stack, 90, Float64Array.of(480, 620), 0.7, pol);
      expect(out.reflectance[0] + out.transmittance[0]).toBeCloseTo(1, 12);
      expect(out.reflectance[1] + out.transmittance[1]).toBeCloseTo(1, 12);
    }
  });
  it('an absorbing thick slab adds only the front-side reflection when opaque', () => {
    const stack: Stack = { ...singleFilm(c(1.5), c(1.5, 1e-3)), incoherentBack: { exitMedium: air, thicknessMm: 1 } };
    const out = stackSpectrum(stack, 0, Float64Array.of(550), 0, 's');
    expect(out.reflectance[0]).toBeCloseTo(0.04, 6);
    expect(out.transmittance[0]).toBeLessThan(1e-6);
  });
});

describe('input checks', () => {
  const stack = singleFilm(c(1.33), air);
  const base = { wavelengthsNm: Float64Array.of(500), thicknessesNm: Float64Array.of(100), angleRad: 0, polarisation: 'mixed' as const };
  it('rejects a negative thickness naming thicknessNm', () => {
    expect(() => filmSpectra(stack, { ...base, thicknessesNm: Float64Array.of(-3) })).toThrow(/thicknessNm must be a finite number >= 0, received -3/);
  });
  it('rejects an angle of 90°', () => {
    expect(() => filmSpectra(stack, { ...base, angleRad: Math.PI / 2 })).toThrow(RangeError);
  });
  it('rejects NaN wavelengths', () => {
    expect(() => filmSpectra(stack, { ...base, wavelengthsNm: Float64Array.of(Number.NaN) })).toThrow(/wavelengthsNm/);
  });
  it('returns empty arrays for an empty grid', () => {
    const out = filmSpectra(stack, { ...base, thicknessesNm: new Float64Array(0) });
    expect(out.reflectance.length).toBe(0);
  });
});
