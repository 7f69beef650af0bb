/**
 * Properties of the transfer-matrix engine that hold for any stack (fast-check), and closed-form
 * results for multilayers. Sources: quarter-wave stack admittance Y = (nH/nL)^{2N}·ns (Macleod,
 * Thin-Film Optical Filters, ch. 5, from memory; also Hecht, Optics §9.9, from memory);
 * reciprocity of transmittance and energy conservation are common practice.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { airyFilm } from '../src/optics/airyFilm.js';
import { filmSpectra } from '../src/optics/filmSpectra.js';
import { constantMaterial } from '../src/optics/material.js';
import { getMaterial } from '../src/optics/materialLibrary.js';
import { stackSpectrum } from '../src/optics/stackSpectrum.js';
import type { Layer, Stack } from '../src/optics/types.js';

const c = constantMaterial;
const air = c(1);

describe('closed-form multilayers', () => {
  it.each([1, 3, 6])('quarter-wave stack (HL)^%i on glass: R = ((1 − Y)/(1 + Y))², Y = (nH/nL)^{2N}·ns', (pairs) => {
    const nH = 2.35;
    const nL = 1.38;
    const ns = 1.52;
    const lambda = 550;
    const layers: Layer[] = [];
    for (let p = 0; p < pairs; p++) {
      // the middle H layer is the 'film', set to its quarter-wave thickness below
      layers.push({ material: c(nH), thicknessNm: p === Math.floor(pairs / 2) ? 'film' : lambda / (4 * nH) });
      layers.push({ material: c(nL), thicknessNm: lambda / (4 * nL) });
    }
    const stack: Stack = { name: 'qw', ambient: air, layers, substrate: c(ns) };
    const Y = (nH / nL) ** (2 * pairs) * ns;
    const expected = ((1 - Y) / (1 + Y)) ** 2;
    const R = stackSpectrum(stack, lambda / (4 * nH), Float64Array.of(lambda), 0, 's').reflectance[0];
    expect(R).toBeCloseTo(expected, 12);
  });
});

describe('energy and symmetry', () => {
  it('lossless film on absorbing Si at 60°, p and s: R + T = 1 (T is the power entering the substrate)', () => {
    const si = getMaterial('si');
    const stack: Stack = { name: 't', ambient: air, layers: [{ material: c(1.46), thicknessNm: 'film' }], substrate: si };
    for (const pol of ['s', 'p'] as const) {
      const out = stackSpectrum(stack, 137, Float64Array.of(400, 500, 700), Math.PI / 3, pol);
      for (let j = 0; j < 3; j++) expect(out.reflectance[j] + out.transmittance[j]).toBeCloseTo(1, 12);
    }
  });
  it('transmittance is reciprocal: same from either side of an absorbing stack between different media', () => {
    const layers: Layer[] = [{ material: c(2.0, 0.08), thicknessNm: 45 }, { material: c(1.6, 0.01), thicknessNm: 'film' }, { material: c(2.4), thicknessNm: 70 }];
    const forward: Stack = { name: 'f', ambient: c(1.0), layers, substrate: c(1.5) };
    const backward: Stack = { name: 'b', ambient: c(1.5), layers: [...layers].reverse(), substrate: c(1.0) };
    const wl = Float64Array.of(420, 555, 690);
    const a = stackSpectrum(forward, 210, wl, 0, 's');
    const b = stackSpectrum(backward, 210, wl, 0, 's');
    for (let j = 0; j < 3; j++) {
      expect(a.transmittance[j]).toBeCloseTo(b.transmittance[j], 12);
      expect(Math.abs(a.reflectance[j] - b.reflectance[j])).toBeGreaterThan(1e-4); // R is not reciprocal when absorbing
    }
  });
  it('a very thick silver film (1 mm) gives the bare-silver reflectance without overflow', () => {
    const ag = getMaterial('ag');
    const thick: Stack = { name: 't', ambient: air, layers: [{ material: ag, thicknessNm: 'film' }], substrate: c(1.5) };
    const bare: Stack = { name: 'b', ambient: air, layers: [{ material: c(1.5), thicknessNm: 'film' }], substrate: ag };
    const wl = Float64Array.of(450, 650);
    const a = stackSpectrum(thick, 1e6, wl, 0.4, 'mixed');
    const b = stackSpectrum(bare, 0, wl, 0.4, 'mixed');
    for (let j = 0; j < 2; j++) {
      expect(Number.isFinite(a.reflectance[j])).toBe(true);
      expect(a.reflectance[j]).toBeCloseTo(b.reflectance[j], 12);
      expect(a.transmittance[j]).toBeLessThan(1e-30);
    }
  });
});

const index = fc.record({ n: fc.double({ min: 1.0, max: 4.5, noNaN: true }), k: fc.double({ min: 0, max: 0.5, noNaN: true }) });

describe('property checks (fast-check)', () => {
  it('single film: matrix method equals the Airy formula for random indices, angles and thicknesses', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1.0, max: 1.6, noNaN: true }), index, index,
        fc.double({ min: 0, max: 3000, noNaN: true }), fc.double({ min: 350, max: 900, noNaN: true }),
        fc.double({ min: 0, max: 1.5, noNaN: true }), fc.constantFrom('s' as const, 'p' as const),
        (n0, film, sub, d, wl, angle, pol) => {
          const stack: Stack = { name: 'p', ambient: c(n0), layers: [{ material: c(film.n, film.k), thicknessNm: 'film' }], substrate: c(sub.n, sub.k) };
          const out = filmSpectra(stack, { wavelengthsNm: Float64Array.of(wl), thicknessesNm: Float64Array.of(d), angleRad: angle, polarisation: pol });
          const ref = airyFilm(n0, film, sub, d, wl, angle, pol);
          expect(Math.abs(out.reflectance[0] - ref.reflectance)).toBeLessThan(1e-9);
          expect(Math.abs(out.transmittance[0] - ref.transmittance)).toBeLessThan(1e-9);
        },
      ),
      { numRuns: 300 },
    );
  });
  it('passive multilayers: 0 <= R, T and A = 1 − R − T >= 0; lossless: A = 0', () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ idx: index, d: fc.double({ min: 0, max: 400, noNaN: true }) }), { minLength: 1, maxLength: 5 }),
        fc.double({ min: 0, max: 1000, noNaN: true }), fc.double({ min: 0, max: 1.5, noNaN: true }),
        fc.constantFrom('s' as const, 'p' as const, 'mixed' as const), fc.boolean(),
        (specs, d, angle, pol, lossless) => {
          const layers: Layer[] = specs.map((s, i) => ({ material: c(s.idx.n, lossless ? 0 : s.idx.k), thicknessNm: i === 0 ? 'film' : s.d }));
          const stack: Stack = { name: 'p', ambient: air, layers, substrate: c(1.52) };
          const out = stackSpectrum(stack, d, Float64Array.of(400, 600), angle, pol);
          for (let j = 0; j < 2; j++) {
            expect(out.reflectance[j]).toBeGreaterThanOrEqual(0);
            expect(out.transmittance[j]).toBeGreaterThanOrEqual(0);
            expect(out.absorptance[j]).toBeGreaterThan(-1e-12);
            if (lossless) expect(Math.abs(out.absorptance[j])).toBeLessThan(1e-11);
          }
        },
      ),
      { numRuns: 300 },
    );
  });
  it('a zero-thickness film is absent: stack with film at 0 equals the stack without it', () => {
    fc.assert(
      fc.property(index, index, fc.double({ min: 0, max: 1.4, noNaN: true }), (film, other, angle) => {
        const fixed: Layer = { material: c(other.n, other.k), thicknessNm: 55 };
        const withFilm: Stack = { name: 'a', ambient: air, layers: [fixed, { material: c(film.n, film.k), thicknessNm: 'film' }], substrate: c(1.5) };
        const without: Stack = { name: 'b', ambient: air, layers: [fixed], substrate: c(1.5) };
        const wl = Float64Array.of(500);
        const a = stackSpectrum(withFilm, 0, wl, angle, 'mixed');
        const b = stackSpectrum(without, 0, wl, angle, 'mixed');
        expect(a.reflectance[0]).toBeCloseTo(b.reflectance[0], 12);
        expect(a.transmittance[0]).toBeCloseTo(b.transmittance[0], 12);
      }),
      { numRuns: 100 },
    );
  });
});
