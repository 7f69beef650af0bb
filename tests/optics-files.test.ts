/**
 * User material files, stack files and stack resolution (src/optics/materialFile.ts,
 * stackFile.ts, resolveStack.ts). Fixtures are written to a temporary folder by the tests;
 * the coefficient values come from shared/materials (Malitson 1965, Daimon & Masumura 2007), so
 * results can be checked against shared/refdata/optical_constants_reference.csv.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { DataFileError } from '../src/optics/dataFileError.js';
import { loadMaterialFile } from '../src/optics/materialFile.js';
import { getMaterial } from '../src/optics/materialLibrary.js';
import { resolveStack } from '../src/optics/resolveStack.js';
import { stackSpectrum } from '../src/optics/stackSpectrum.js';

let dir = '';
const file = (name: string, text: string): string => {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
};

// Malitson 1965 fused silica, coefficients as in shared/refdata/sources.csv (malitson_1965_sio2)
const malitson = {
  formula: 'sellmeier',
  coefficients: { A: 0, B: [0.6961663, 0.4079426, 0.8974794], C: [0.0684043 ** 2, 0.1162414 ** 2, 9.896161 ** 2] },
  k: 0,
  valid_range_um: [0.21, 3.71],
  source: 'Malitson 1965',
};

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'lamella-optics-'));
});

describe('loadMaterialFile()', () => {
  it('JSON Sellmeier file reproduces Malitson 1965 n(589.3 nm) = 1.45840 (optical_constants_reference.csv)', () => {
    const m = loadMaterialFile(file('silica.json', JSON.stringify(malitson)));
    expect(Math.abs(m.indexAt(589.3).n - 1.4584)).toBeLessThanOrEqual(0.000005);
    expect(m.validRangeNm).toEqual([210, 3710]);
  });
  it('CSV n,k table interpolates linearly (Green 2008 rows 630/640 nm give WE08 values at 632.8 nm)', () => {
    const m = loadMaterialFile(file('si.csv', 'wavelength_nm,n,k\n630,3.879,0.016444\n640,3.861,0.015432\n'));
    expect(m.indexAt(632.8).n).toBeCloseTo(3.874, 3);
    expect(m.indexAt(632.8).k).toBeCloseTo(0.0162, 4);
    expect(() => m.indexAt(650)).toThrow(/outside its valid range 630–640 nm/);
  });
  it('JSON Cauchy file with a k table', () => {
    const m = loadMaterialFile(file('cauchy.json', JSON.stringify({
      formula: 'cauchy', coefficients: { A: 1.5, B: [0.004], p: [-2] }, valid_range_um: [0.4, 0.8],
      k: { wavelength_um: [0.4, 0.8], k: [0.002, 0.001] },
    })));
    expect(m.indexAt(500).n).toBeCloseTo(1.5 + 0.004 / 0.25, 14);
    expect(m.indexAt(600).k).toBeCloseTo(0.0015, 14);
  });
  const bad: Array<[string, string, string, RegExp]> = [
    ['non-finite number', 'nan.csv', 'wavelength_nm,n,k\n500,abc,0\n600,1.5,0\n', /nan\.csv: line 2: n must be a finite number > 0, received text of 3 characters/],
    ['k < 0', 'negk.csv', 'wavelength_nm,n,k\n500,1.5,0\n600,1.5,-0.1\n', /negk\.csv: line 3: k must be >= 0, received -0\.1/],
    ['non-monotonic wavelengths', 'order.csv', 'wavelength_nm,n,k\n500,1.5,0\n490,1.5,0\n', /order\.csv: line 3: wavelengths must increase strictly, received 490 nm after 500 nm/],
    ['wrong header', 'header.csv', 'lambda,n\n500,1.5\n', /header\.csv: line 1: expected the header "wavelength_nm,n,k"/],
    ['missing column', 'cols.csv', 'wavelength_nm,n,k\n500,1.5\n600,1.5,0\n', /cols\.csv: line 2: expected 3 values/],
    ['missing formula', 'noformula.json', JSON.stringify({ coefficients: {}, valid_range_um: [0.4, 0.8] }), /noformula\.json: missing field "formula"/],
    ['missing range', 'norange.json', JSON.stringify({ formula: 'cauchy', coefficients: { A: 1.5, B: [0], p: [-2] } }), /norange\.json: missing field "valid_range_um"/],
    ['non-finite coefficient', 'coef.json', JSON.stringify({ ...malitson, coefficients: { A: 0, B: [1, 'x', 1], C: [0, 0, 0] } }), /coef\.json: coefficients\.B\[1\] must be a finite number, received "x"/],
    ['negative k table', 'ktab.json', JSON.stringify({ ...malitson, k: { wavelength_um: [0.4, 0.5], k: [0, -1] } }), /ktab\.json: k\.k\[1\] must be >= 0, received -1/],
    ['unknown formula', 'formula.json', JSON.stringify({ ...malitson, formula: 'drude' }), /formula\.json: formula must be "sellmeier", "cauchy" or "gas", received "drude"/],
    ['invalid JSON', 'broken.json', '{ "formula": ', /broken\.json: not valid JSON/],
  ];
  for (const [what, name, text, message] of bad) {
    it(`rejects a file with ${what}, naming the file and the field/line`, () => {
      const path = file(name, text);
      expect(() => loadMaterialFile(path)).toThrow(DataFileError);
      expect(() => loadMaterialFile(path)).toThrow(message);
    });
  }
  it('rejects a missing file and an unknown extension', () => {
    expect(() => loadMaterialFile(join(dir, 'nope.csv'))).toThrow(/nope\.csv: file not found/);
    expect(() => loadMaterialFile(file('m.txt', 'x'))).toThrow(/must end in \.json .* or \.csv/);
  });
});

describe('stack files and resolveStack()', () => {
  it('resolveStack(preset) gives the preset; unknown names list the presets', () => {
    expect(resolveStack('oxide-on-silicon').layers[0].material.name).toBe('fused-silica');
    expect(() => resolveStack('oxide')).toThrow(/unknown stack 'oxide': expected a preset \(soap-film, oxide-on-silicon, nitride-on-silicon\)/);
  });
  it('film override by library name and by number', () => {
    expect(resolveStack('soap-film', { filmMaterial: 'glycerol-water:20' }).layers[0].material.indexAt(589.3).n).toBeCloseTo(1.3559, 4);
    const fixed = resolveStack('soap-film', { filmMaterial: '1.40' });
    expect(fixed.layers[0].material.indexAt(500)).toEqual({ n: 1.4, k: 0 });
    expect(resolveStack('soap-film', { filmMaterial: 1.5 }).layers[0].material.indexAt(700).n).toBe(1.5);
    expect(() => resolveStack('soap-film', { filmMaterial: 'soap' })).toThrow(/unknown film material 'soap'/);
  });
  it('filmIndexScale multiplies n of the film only', () => {
    const s = resolveStack('oxide-on-silicon', { filmIndexScale: 1.01 });
    expect(s.layers[0].material.indexAt(589.3).n).toBeCloseTo(1.4584 * 1.01, 4);
    expect(s.substrate.indexAt(589.3).n).toBe(getMaterial('si').indexAt(589.3).n);
  });
  it('a stack file with library names, a constant, {n,k}, an inline formula and a relative material file', () => {
    file('layer.csv', 'wavelength_nm,n,k\n300,2.0,0.01\n900,2.0,0.01\n');
    const path = file('stack.json', JSON.stringify({
      name: 'demo coating (invented scenario)',
      ambient: 'air',
      layers: [
        { material: 'layer.csv', thicknessNm: 20 },
        { material: { n: 1.7, k: 0.001 }, thicknessNm: 30 },
        { material: malitson, thicknessNm: 'film' },
        { material: 1.9, thicknessNm: 50 },
      ],
      substrate: 'n-bk7',
      backSide: { exitMedium: 'air', thicknessMm: 1 },
    }));
    const stack = resolveStack(path);
    expect(stack.name).toBe('demo coating (invented scenario)');
    expect(stack.layers.map((l) => l.thicknessNm)).toEqual([20, 30, 'film', 50]);
    expect(stack.layers[0].material.indexAt(500)).toEqual({ n: 2, k: 0.01 });
    expect(stack.incoherentBack?.thicknessMm).toBe(1);
    const out = stackSpectrum(stack, 100, Float64Array.of(450, 550, 650), 0.2, 'mixed');
    for (let j = 0; j < 3; j++) {
      expect(out.absorptance[j]).toBeGreaterThan(0);
      expect(out.reflectance[j] + out.transmittance[j] + out.absorptance[j]).toBeCloseTo(1, 14);
    }
  });
  const badStacks: Array<[string, unknown, RegExp]> = [
    ['missing substrate', { ambient: 'air', layers: [{ material: 'water', thicknessNm: 'film' }] }, /missing field "substrate"/],
    ['no film layer', { ambient: 'air', layers: [{ material: 'water', thicknessNm: 10 }], substrate: 'air' }, /at least one layer must have "thicknessNm": "film"/],
    ['negative thickness', { ambient: 'air', layers: [{ material: 'water', thicknessNm: -5 }, { material: 'water', thicknessNm: 'film' }], substrate: 'air' }, /layers\[0\]\.thicknessNm must be "film" or a finite number >= 0, received -5/],
    ['unknown material', { ambient: 'air', layers: [{ material: 'soapy', thicknessNm: 'film' }], substrate: 'air' }, /layers\[0\]\.material: unknown material "soapy"; expected .* one of vacuum, air/],
    ['negative k', { ambient: 'air', layers: [{ material: { n: 1.5, k: -0.1 }, thicknessNm: 'film' }], substrate: 'air' }, /layers\[0\]\.material\.k must be a finite number >= 0, received -0\.1/],
    ['bad inline formula', { ambient: 'air', layers: [{ material: { formula: 'sellmeier', coefficients: { B: [1] , C: [] }, valid_range_um: [0.3, 0.9] }, thicknessNm: 'film' }], substrate: 'air' }, /layers\[0\]\.material: coefficients\.C must be a non-empty array/],
  ];
  it('a stack file that does not exist: DataFileError naming it', () => {
    expect(() => resolveStack(join(dir, 'missing.json'))).toThrow(/missing\.json: file not found/);
  });
  for (const [what, record, message] of badStacks) {
    it(`rejects a stack file with ${what}, naming the file and the field`, () => {
      const path = file(`bad-${what.replace(/\s+/g, '-')}.json`, JSON.stringify(record));
      expect(() => resolveStack(path)).toThrow(DataFileError);
      expect(() => resolveStack(path)).toThrow(message);
      expect(() => resolveStack(path)).toThrow(path);
    });
  }
});
