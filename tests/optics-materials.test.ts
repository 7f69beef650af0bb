/**
 * Built-in materials (src/optics/materialLibrary.ts) against shared/refdata/optical_constants_reference.csv
 * (values computed from the published formulas or read from the published tables; sources in
 * shared/refdata/sources.csv) and the values quoted in shared/materials/SOURCES.md and the JSON notes.
 * Tolerance = half a unit in the last printed digit unless stated.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { sharedPath } from '../src/data/sharedDir.js';
import { getMaterial, listMaterialNames } from '../src/optics/materialLibrary.js';
import { presetStack, listStackPresetNames } from '../src/optics/presets.js';

function halfUlp(text: string): number {
  const decimals = text.includes('.') ? text.split('.')[1].length : 0;
  return 0.5 * 10 ** -decimals + 1e-12;
}

interface Row { material: string; wavelengthNm: number; n: string; k: string; source: string }
const rows: Row[] = readFileSync(sharedPath('refdata', 'optical_constants_reference.csv'), 'utf8')
  .trim().split('\n').slice(1)
  .map((line) => {
    const m = /^"([^"]+)",([^,]+),([^,]+),([^,]+),([^,]+),([^,]+)$/.exec(line.trim());
    if (!m) throw new Error(`unparsed reference line ${line}`);
    return { material: m[1], wavelengthNm: Number(m[2]), n: m[3], k: m[4], source: m[6] };
  });

const librarySource: Record<string, string> = {
  green_2008_si: 'si',
  malitson_1965_sio2: 'fused-silica',
  luke_2015_si3n4: 'si3n4',
  daimon_masumura_2007_h2o: 'water',
};

describe('library n, k against shared/refdata/optical_constants_reference.csv', () => {
  const cases = rows.filter((row) => row.source in librarySource);
  it('covers Green 2008, Malitson 1965, Luke 2015 and Daimon & Masumura 2007 rows', () => {
    expect(cases.length).toBeGreaterThanOrEqual(41 + 14 * 3);
  });
  for (const row of cases) {
    const name = librarySource[row.source];
    it(`${name} at ${row.wavelengthNm} nm: n = ${row.n}, k = ${row.k} (${row.source})`, () => {
      const index = getMaterial(name).indexAt(row.wavelengthNm);
      expect(Math.abs(index.n - Number(row.n))).toBeLessThanOrEqual(halfUlp(row.n));
      expect(Math.abs(index.k - Number(row.k))).toBeLessThanOrEqual(halfUlp(row.k));
    });
  }
  it('Si (Green 2008) interpolated at 632.8 nm gives n = 3.874, k = 0.0162 as quoted in WE08', () => {
    const { n, k } = getMaterial('si').indexAt(632.8);
    expect(n).toBeCloseTo(3.874, 3);
    expect(k).toBeCloseTo(0.0162, 4);
  });
  it('Si (Aspnes & Studna 1983, other table) agrees with Green 2008 within 0.02 in n at 590.4 nm', () => {
    expect(Math.abs(getMaterial('si').indexAt(590.4).n - 3.969)).toBeLessThan(0.02);
  });
});

describe('values quoted in shared/materials (JSON notes and SOURCES.md)', () => {
  it.each([
    [0, '1.3325'], [20, '1.3559'], [50, '1.3949'], [100, '1.4713'],
  ])('glycerol-water:%s at 589.3 nm gives %s (Gupta et al. 2022, JSON note)', (wt, expected) => {
    expect(Math.abs(getMaterial(`glycerol-water:${wt}`).indexAt(589.3).n - Number(expected))).toBeLessThanOrEqual(halfUlp(expected));
  });
  it('glycerol-water:10 lies between 0 and 20 wt% and is piecewise, not on the 0–100 wt% straight line', () => {
    const n0 = getMaterial('glycerol-water:0').indexAt(589.3).n;
    const n20 = getMaterial('glycerol-water:20').indexAt(589.3).n;
    const n100 = getMaterial('glycerol-water:100').indexAt(589.3).n;
    const n10 = getMaterial('glycerol-water:10').indexAt(589.3).n;
    expect(n10).toBeCloseTo((n0 + n20) / 2, 12);
    // JSON note: the straight 0-100 wt% line overestimates by about 0.004 at 20 wt%
    expect(n0 + 0.2 * (n100 - n0) - n20).toBeGreaterThan(0.003);
  });
  it('glycerol-water: low concentration slope about 0.0012 per wt% (JSON note)', () => {
    const slope = (getMaterial('glycerol-water:20').indexAt(589.3).n - getMaterial('glycerol-water:0').indexAt(589.3).n) / 20;
    expect(Math.abs(slope - 0.0012)).toBeLessThan(0.0001);
  });
  it('Si3N4 (Luke 2015) n(633 nm) = 2.039 (JSON note)', () => {
    expect(Math.abs(getMaterial('si3n4').indexAt(633).n - 2.039)).toBeLessThanOrEqual(0.0005);
  });
  it('fused silica (Malitson 1965) n(633 nm) = 1.4570 (JSON note)', () => {
    expect(Math.abs(getMaterial('fused-silica').indexAt(633).n - 1.457)).toBeLessThanOrEqual(0.00005);
  });
  it('Al2O3 (Malitson 1962) n(589 nm) = 1.768 (JSON note)', () => {
    expect(Math.abs(getMaterial('al2o3').indexAt(589).n - 1.768)).toBeLessThanOrEqual(0.0005);
  });
  it('MgF2 (Dodge 1984) n(550 nm) = 1.3785 (JSON note)', () => {
    expect(Math.abs(getMaterial('mgf2').indexAt(550).n - 1.3785)).toBeLessThanOrEqual(0.00005);
  });
  it('TiO2 rutile (Devore 1951) n(589 nm) = 2.613 (JSON note)', () => {
    expect(Math.abs(getMaterial('tio2-rutile').indexAt(589).n - 2.613)).toBeLessThanOrEqual(0.0005);
  });
  it('TiO2 ALD film (Siefke 2016) n(589 nm) = 2.41 (JSON note on Devore file)', () => {
    expect(Math.abs(getMaterial('tio2-ald').indexAt(589).n - 2.41)).toBeLessThanOrEqual(0.005);
  });
  it('N-BK7 (SCHOTT) nd = 1.5168 at 587.56 nm, and k from its table', () => {
    const { n, k } = getMaterial('n-bk7').indexAt(587.56);
    expect(Math.abs(n - 1.5168)).toBeLessThanOrEqual(0.00005);
    expect(k).toBeGreaterThan(0);
    expect(k).toBeLessThan(1e-7);
    expect(getMaterial('n-bk7').indexAt(500).k).toBeCloseTo(9.5781e-9, 13);
  });
  it('PMMA (Sultanova 2009 fit) extrapolated to 350 nm gives 1.5173 (JSON note)', () => {
    const pmma = getMaterial('pmma', { extrapolate: true });
    expect(Math.abs(pmma.indexAt(350).n - 1.5173)).toBeLessThanOrEqual(0.00005);
  });
  it('polystyrene (Sultanova 2009 fit) extrapolated to 350 nm gives 1.6519 (JSON note)', () => {
    expect(Math.abs(getMaterial('polystyrene', { extrapolate: true }).indexAt(350).n - 1.6519)).toBeLessThanOrEqual(0.00005);
  });
  it('soda-lime glass (Rubin 1985) n(589 nm) about 1.52 (JSON note) with tabulated k', () => {
    const { n, k } = getMaterial('soda-lime').indexAt(589);
    expect(Math.abs(n - 1.52)).toBeLessThan(0.005);
    expect(k).toBeCloseTo(3.959e-7, 9);
  });
  it('air (Ciddor 1996): n − 1 about 2.8e-4 in the visible (JSON note)', () => {
    const n = getMaterial('air').indexAt(550).n;
    expect(Math.abs(n - 1 - 2.8e-4)).toBeLessThan(0.1e-4);
  });
  it('water (Daimon 2007) at 589.3 nm differs from Hale & Querry 1973 by less than 0.002 (different temperature and method)', () => {
    expect(Math.abs(getMaterial('water').indexAt(589.3).n - getMaterial('water-hale').indexAt(589.3).n)).toBeLessThan(0.002);
  });
  it('Ag (Johnson & Christy 1972) and Al (Rakić 1998) are metals in the visible: k > n', () => {
    for (const name of ['ag', 'al']) {
      const { n, k } = getMaterial(name).indexAt(550);
      expect(k).toBeGreaterThan(2);
      expect(k).toBeGreaterThan(n);
    }
  });
});

describe('names, ranges and errors', () => {
  it('listMaterialNames() includes every material of the brief', () => {
    const names = listMaterialNames();
    for (const name of ['air', 'water', 'glycerol-water:<wt%>', 'fused-silica', 'si', 'si3n4', 'si3n4-philipp', 'tio2-rutile', 'tio2-ald', 'al2o3', 'mgf2', 'n-bk7', 'soda-lime', 'pmma', 'polystyrene', 'al', 'ag']) {
      expect(names).toContain(name);
    }
  });
  it('every listed name loads and evaluates at 550 nm', () => {
    for (const name of listMaterialNames()) {
      const m = getMaterial(name.replace('<wt%>', '35'));
      const { n, k } = m.indexAt(550);
      expect(n).toBeGreaterThan(0);
      expect(k).toBeGreaterThanOrEqual(0);
      expect(m.source.length).toBeGreaterThan(3);
    }
  });
  it('aliases and case: SiO2 is fused silica', () => {
    expect(getMaterial('SiO2').indexAt(550).n).toBe(getMaterial('fused-silica').indexAt(550).n);
  });
  it('outside the valid range: RangeError naming the material, the wavelength and the range', () => {
    expect(() => getMaterial('tio2-rutile').indexAt(400)).toThrow(RangeError);
    expect(() => getMaterial('tio2-rutile').indexAt(400)).toThrow(/tio2-rutile.*400 nm.*430–1530 nm/);
    expect(() => getMaterial('si').indexAt(1500)).toThrow(/si: wavelength 1500 nm is outside its valid range 250–1450 nm/);
  });
  it('extrapolate: allowed with one warning per material', () => {
    const warnings: string[] = [];
    const m = getMaterial('pmma', { extrapolate: true, onWarning: (w) => warnings.push(w) });
    m.indexAt(380);
    m.indexAt(390);
    m.indexAt(500);
    expect(warnings).toHaveLength(1);
    expect(warnings[0]).toMatch(/pmma: extrapolating outside its valid range 436.8–1052 nm \(first at 380 nm\)/);
  });
  it('unknown material: RangeError listing valid names', () => {
    expect(() => getMaterial('unobtainium')).toThrow(/unknown material 'unobtainium': expected one of vacuum, air, water/);
  });
  it('glycerol-water outside [0, 100] wt% is a RangeError', () => {
    expect(() => getMaterial('glycerol-water:120')).toThrow(/weight percent.*\[0, 100\], received 120/);
    expect(() => getMaterial('glycerol-water:')).toThrow(RangeError);
  });
  it('presets have the contracted names and materials', () => {
    expect(listStackPresetNames()).toEqual(['soap-film', 'oxide-on-silicon', 'nitride-on-silicon']);
    const soap = presetStack('soap-film');
    expect(soap.layers[0].material.name).toBe('water');
    expect(soap.substrate.name).toBe('air');
    expect(presetStack('oxide-on-silicon').substrate.name).toBe('si');
    expect(presetStack('oxide-on-silicon').layers[0].material.name).toBe('fused-silica');
    expect(presetStack('nitride-on-silicon').layers[0].material.name).toBe('si3n4');
  });
});
