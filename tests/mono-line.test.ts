import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { sharedPath } from '../src/data/sharedDir.js';
import { isMonochromaticLight, narrowestPowerWindow } from '../src/mono/isMonochromaticLight.js';
import {
  EXTREME_MAX,
  EXTREME_MIN,
  branchOfThickness,
  buildLineReflectanceTable,
  thicknessOnBranch,
} from '../src/mono/lineReflectanceTable.js';
import { airyFreeFilmReflectance, scheludkoThicknessNm } from '../src/mono/scheludko.js';
import { stackLineTable } from '../src/mono/stackLineReflectance.js';
import { getMaterial } from '../src/optics/materialLibrary.js';
import { resolveStack } from '../src/optics/resolveStack.js';

function readSpd(file: string): { wavelengthsNm: number[]; values: number[] } {
  const rows = readFileSync(sharedPath('cie', file), 'utf8').trim().split('\n').slice(1);
  return {
    wavelengthsNm: rows.map((r) => Number(r.split(',')[0])),
    values: rows.map((r) => Number(r.split(',')[1])),
  };
}

function gaussianSpd(centreNm: number, fwhmNm: number): { wavelengthsNm: number[]; values: number[] } {
  const wavelengthsNm = Array.from({ length: 401 }, (_, i) => 380 + i);
  const sigma = fwhmNm / 2.3548;
  return { wavelengthsNm, values: wavelengthsNm.map((w) => Math.exp(-0.5 * ((w - centreNm) / sigma) ** 2)) };
}

describe('isMonochromaticLight() with light specs', () => {
  it('reads line:<nm> specs', () => {
    expect(isMonochromaticLight('line:546')).toBe(546);
    expect(isMonochromaticLight('line:589.3')).toBe(589.3);
    expect(isMonochromaticLight(' LINE: 632.8nm')).toBe(632.8);
  });
  it('returns null for named broadband lights', () => {
    expect(isMonochromaticLight('D65')).toBeNull();
    expect(isMonochromaticLight('blackbody:3200')).toBeNull();
  });
  it('rejects a line outside 380–780 nm, naming the range and the value', () => {
    expect(() => isMonochromaticLight('line:365')).toThrow(RangeError);
    expect(() => isMonochromaticLight('line:365')).toThrow(/between 380 and 780 nm.*received 365/);
    expect(() => isMonochromaticLight('line:1064')).toThrow(/received 1064/);
  });
  it('rejects a line spec without a number', () => {
    expect(() => isMonochromaticLight('line:')).toThrow(/needs a wavelength in nm/);
    expect(() => isMonochromaticLight('line:green')).toThrow(/needs a wavelength in nm/);
  });
});

describe('isMonochromaticLight() with sampled SPDs', () => {
  // CIE illuminants from shared/cie (CIE 015:2018 data sets and CIE LED illuminants; see SOURCES.md).
  it.each(['illuminant_D65.csv', 'illuminant_A.csv', 'illuminant_F11.csv', 'illuminant_LED-B1.csv', 'illuminant_LED-RGB1.csv'])(
    'treats CIE %s as broadband',
    (file) => {
      expect(isMonochromaticLight(readSpd(file))).toBeNull();
    },
  );
  it('finds a single sampled line: Hg 546.07 nm on a 0.01 nm grid (wavelength from memory, NIST ASD)', () => {
    const wavelengthsNm = Array.from({ length: 2001 }, (_, i) => 536 + i * 0.01);
    const values = wavelengthsNm.map((w) => (Math.abs(w - 546.07) < 0.005 ? 1 : 0));
    expect(isMonochromaticLight({ wavelengthsNm, values })).toBeCloseTo(546.07, 2);
  });
  it('finds a line sampled as one value on a 5 nm grid', () => {
    const wavelengthsNm = Array.from({ length: 81 }, (_, i) => 380 + 5 * i);
    const values = wavelengthsNm.map((w) => (w === 590 ? 1 : 0));
    expect(isMonochromaticLight({ wavelengthsNm, values })).toBe(590);
  });
  it('accepts a filtered LED of 10 nm FWHM and refuses a bare LED of 30 nm FWHM (demo spectra, our scenario)', () => {
    expect(isMonochromaticLight(gaussianSpd(589, 10))).toBeCloseTo(589, 1);
    expect(isMonochromaticLight(gaussianSpd(530, 30))).toBeNull();
  });
  it('narrowestPowerWindow() holds 90 % of a Gaussian within ±1.645 σ', () => {
    const w = narrowestPowerWindow(gaussianSpd(600, 23.548))!; // σ = 10 nm
    expect(w.toNm - w.fromNm).toBeCloseTo(2 * 1.645 * 10, 0);
    expect(w.centroidNm).toBeCloseTo(600, 1);
  });
  it('rejects an all-zero SPD and mismatched lengths', () => {
    expect(() => isMonochromaticLight({ wavelengthsNm: [500, 510], values: [0, 0] })).toThrow(/positive power/);
    expect(() => isMonochromaticLight({ wavelengthsNm: [500, 510], values: [1] })).toThrow(/same length/);
  });
});

describe('buildLineReflectanceTable() for a free film (Airy formula)', () => {
  const lineNm = 546.1;
  const n = 1.33483; // water at 546.1 nm, 20 °C, shared/refdata/optical_constants_reference.csv (Daimon & Masumura 2007)
  const table = buildLineReflectanceTable(
    (h) => h.map((d) => airyFreeFilmReflectance(d, lineNm, n)),
    lineNm,
    1000,
    0.25,
  );
  const quarterNm = lineNm / (4 * n);
  it('puts branch boundaries at multiples of λ/(4n) to the grid step, kinds alternating from a minimum', () => {
    expect(table.branchCount).toBe(Math.ceil(1000 / quarterNm));
    for (let b = 1; b < table.branchCount; b++) {
      expect(Math.abs(table.boundaryIndex[b] * table.stepNm - b * quarterNm)).toBeLessThanOrEqual(0.25);
      expect(table.boundaryKind[b]).toBe(b % 2 === 1 ? EXTREME_MAX : EXTREME_MIN);
    }
    expect(table.boundaryKind[0]).toBe(EXTREME_MIN);
    expect(table.levelMin).toBeLessThan(1e-5);
  });
  it('thicknessOnBranch() agrees with the formula of Scheludko within 0.01 nm away from extremes', () => {
    for (let b = 0; b < 8; b++) {
      for (let f = 0.1; f <= 0.9; f += 0.1) {
        const h = (b + f) * quarterNm;
        const R = airyFreeFilmReflectance(h, lineNm, n);
        const rising = b % 2 === 0;
        const viaFormula = scheludkoThicknessNm(R / table.levelMax, {
          wavelengthNm: lineNm,
          filmIndex: n,
          order: rising ? b / 2 : (b + 1) / 2,
          branch: rising ? 'rising' : 'falling',
        });
        expect(Math.abs(thicknessOnBranch(table, b, R) - viaFormula)).toBeLessThan(0.01);
        expect(branchOfThickness(table, h)).toBe(b);
      }
    }
  });
  it('clamps reflectances beyond a branch to its ends', () => {
    expect(thicknessOnBranch(table, 0, 1)).toBeCloseTo(table.boundaryIndex[1] * 0.25, 9);
    expect(thicknessOnBranch(table, 1, -0.1)).toBeCloseTo(table.boundaryIndex[2] * 0.25, 9);
  });
  it('rejects a bad thickness range', () => {
    expect(() => buildLineReflectanceTable((h) => h, 546, -5)).toThrow(/maxThicknessNm must be a finite number > 0, received -5/);
  });
});

describe('stackLineTable() for oxide on silicon (transfer-matrix path)', () => {
  // WE09 / WE10 of shared/refdata/worked_examples.csv (Green 2008 Si at 550 nm, n(SiO2) = 1.46):
  // bare Si 36.73 %, quarter-wave oxide 9.82 %. Our fused-silica index (Malitson 1965) is 1.4599
  // at 550 nm and the ambient is standard air, so allow 0.1 percentage point.
  const table = stackLineTable(resolveStack('oxide-on-silicon'), 550, { angleRad: 0, maxThicknessNm: 600 });
  it('starts at the bare-silicon reflectance (WE09, 36.73 %)', () => {
    expect(100 * table.reflectance[0]).toBeCloseTo(36.73, 0);
    expect(Math.abs(100 * table.reflectance[0] - 36.73)).toBeLessThan(0.1);
    expect(table.boundaryKind[0]).toBe(EXTREME_MAX);
  });
  it('has its first minimum at the quarter-wave thickness with R = 9.82 % (WE10)', () => {
    const firstNm = table.boundaryIndex[1] * table.stepNm;
    expect(Math.abs(firstNm - 550 / (4 * 1.4599))).toBeLessThan(0.5);
    expect(table.boundaryKind[1]).toBe(EXTREME_MIN);
    expect(Math.abs(100 * table.reflectance[table.boundaryIndex[1]] - 9.82)).toBeLessThan(0.1);
  });
  it('rejects a line outside the visible range', () => {
    expect(() => stackLineTable(resolveStack('oxide-on-silicon'), 1064, { angleRad: 0, maxThicknessNm: 600 })).toThrow(/between 380 and 780 nm/);
  });
});

describe('stackLineTable() over a narrow band (finite coherence)', () => {
  // Demo SPD (our scenario): a Gaussian band, FWHM 10 nm at 589 nm, sampled every 0.5 nm.
  // Reference: for a two-beam fringe cos(4π n_g h / λ) under a Gaussian band of standard
  // deviation σ_λ, the fringe visibility falls as exp(−(4π n_g h σ_λ / λ0²)² / 2) (coherence of
  // quasi-monochromatic light, e.g. Born & Wolf, Principles of Optics, ch. 7; from memory), with the
  // group index n_g = n − λ dn/dλ. A free water film is nearly two-beam (r² ≈ 2 %); allow 0.005.
  const stack = resolveStack('soap-film');
  const lineNm = 589;
  const fwhmNm = 10;
  const sigmaNm = fwhmNm / 2.3548;
  const wavelengthsNm = Array.from({ length: 161 }, (_, i) => 549 + 0.5 * i);
  const band = { wavelengthsNm, values: wavelengthsNm.map((w) => Math.exp(-0.5 * ((w - lineNm) / sigmaNm) ** 2)) };
  const line = stackLineTable(stack, lineNm, { angleRad: 0, maxThicknessNm: 3000 });
  const wide = stackLineTable(stack, lineNm, { angleRad: 0, maxThicknessNm: 3000, band, bandHalfWidthNm: 20 });
  /** Swing max − min of R over the branch boundaries within ±150 nm of h. */
  const swing = (table: typeof line, hNm: number): number => {
    let hi = -Infinity;
    let lo = Infinity;
    for (const i of table.boundaryIndex) {
      if (Math.abs(i * table.stepNm - hNm) > 150 || i === 0 || i === table.reflectance.length - 1) continue;
      hi = Math.max(hi, table.reflectance[i]);
      lo = Math.min(lo, table.reflectance[i]);
    }
    return hi - lo;
  };
  it('keeps the line contrast for thin films and loses it for thick ones as the Gaussian formula says', () => {
    const water = getMaterial('water');
    const n = water.indexAt(lineNm).n;
    const dn = (water.indexAt(lineNm + 0.5).n - water.indexAt(lineNm - 0.5).n) / 1;
    const groupIndex = n - lineNm * dn;
    for (const hNm of [300, 1500, 2700]) {
      const expected = Math.exp(-0.5 * ((4 * Math.PI * groupIndex * hNm * sigmaNm) / lineNm ** 2) ** 2);
      expect(Math.abs(swing(wide, hNm) / swing(line, hNm) - expected)).toBeLessThan(0.005);
    }
    expect(swing(wide, 2700) / swing(line, 2700)).toBeLessThan(0.9);
  });
  it('equals the line table when no band is given', () => {
    const again = stackLineTable(stack, lineNm, { angleRad: 0, maxThicknessNm: 3000, band: null });
    expect(Array.from(again.reflectance.subarray(0, 50))).toEqual(Array.from(line.reflectance.subarray(0, 50)));
  });
});
