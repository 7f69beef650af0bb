import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  LIGHT_NAMES,
  applyWeightsToSpectra,
  buildCamera,
  colourMatchingFunctions,
  readCameraSensitivities,
  resolveLight,
  whitePointXyz,
} from '../src/colour/index.js';

const dir = mkdtempSync(join(tmpdir(), 'lamella-colour-'));
function file(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

describe('colourMatchingFunctions() (CIE 018:2019 tables)', () => {
  // Column sums of the 1 nm tables, as quoted in shared/cie/SOURCES.md (checksums published with
  // the CIE data sets' copies): 1931: 106.865469489595 / 106.856917101172 / 106.892251278636.
  it('CIE 1931 2° column sums equal the published checksums to 1e-9', () => {
    const cmf = colourMatchingFunctions('1931');
    const sum = (a: Float64Array) => a.reduce((s, v) => s + v, 0);
    expect(cmf.wavelengthsNm.length).toBe(471);
    expect(Math.abs(sum(cmf.xBar) - 106.865469489595)).toBeLessThan(1e-9);
    expect(Math.abs(sum(cmf.yBar) - 106.856917101172)).toBeLessThan(1e-9);
    expect(Math.abs(sum(cmf.zBar) - 106.892251278636)).toBeLessThan(1e-9);
  });
  it('ȳ(555) = 1.0 for the 1931 observer (the photopic peak; CIE 018:2019)', () => {
    const cmf = colourMatchingFunctions('1931');
    expect(cmf.yBar[555 - 360]).toBeCloseTo(1, 6);
  });
  it('rejects an unknown observer, listing the valid ones', () => {
    expect(() => colourMatchingFunctions('1976' as never)).toThrow(/observer must be one of 1931, 1964, received "1976"/);
  });
});

describe('resolveLight()', () => {
  it('knows every CIE light of the list by its CIE name', () => {
    expect(LIGHT_NAMES).toEqual(['D65', 'D50', 'A', 'F2', 'F7', 'F11', 'LED-B1', 'LED-B2', 'LED-B3', 'LED-B4', 'LED-B5', 'LED-BH1', 'LED-RGB1', 'LED-V1', 'LED-V2']);
    for (const name of LIGHT_NAMES) expect(resolveLight(name).name).toBe(name);
  });
  it('accepts case variants and the FL spelling', () => {
    expect(resolveLight('d65').name).toBe('D65');
    expect(resolveLight('FL11').name).toBe('F11');
    expect(resolveLight('led-b3').name).toBe('LED-B3');
  });
  it('unknown names throw a RangeError listing the valid lights', () => {
    expect(() => resolveLight('daylight')).toThrow(RangeError);
    expect(() => resolveLight('daylight')).toThrow(/unknown light "daylight".*D65, D50, A, F2.*blackbody:<K>, line:<nm>/);
  });
  it('blackbody:<K> and line:<nm> parse and check their numbers', () => {
    expect(resolveLight('blackbody:3200K').description).toMatch(/3200 K/);
    expect(resolveLight('line:589.3').lineNm).toBe(589.3);
    expect(() => resolveLight('blackbody:hot')).toThrow(/blackbody temperature must be a number of kelvin between 500 and 100000, received NaN/);
    expect(() => resolveLight('line:1064')).toThrow(/line wavelength must be a number of nm between 360 and 830, received 1064/);
  });
  it('a line light renders a film white-balanced to it as grey (equal R, G, B)', () => {
    const camera = buildCamera({ light: resolveLight('line:546.1') });
    const [r, g, b] = applyWeightsToSpectra(camera.weights, Float64Array.of(0.3));
    expect(r).toBeCloseTo(0.3, 12);
    expect(g).toBeCloseTo(0.3, 12);
    expect(b).toBeCloseTo(0.3, 12);
  });
});

describe('user SPD files (wavelength_nm,relative_spd)', () => {
  it('a valid file is read, and a flat spectrum has the equal-energy white x = y ≈ 1/3', () => {
    const rows = ['wavelength_nm,relative_spd'];
    for (let nm = 380; nm <= 780; nm += 10) rows.push(`${nm},1`);
    const light = resolveLight(file('flat.csv', rows.join('\n')));
    const [x, y, z] = whitePointXyz(light);
    // Illuminant E: x = y = 1/3 by construction of the CIE 1931 functions (equal areas), CIE 15:2004.
    expect(x / (x + y + z)).toBeCloseTo(1 / 3, 3);
    expect(y / (x + y + z)).toBeCloseTo(1 / 3, 3);
  });
  it('a malformed number names the file and line', () => {
    const path = file('bad.csv', 'wavelength_nm,relative_spd\n400,1\n500,abc\n700,1\n');
    expect(() => resolveLight(path)).toThrow(`${path}, line 3: column "relative_spd" must be a finite number, found text of 3 characters`);
  });
  it('non-monotonic wavelengths name the file and line', () => {
    const path = file('order.csv', 'wavelength_nm,relative_spd\n400,1\n600,1\n550,1\n700,1\n');
    expect(() => resolveLight(path)).toThrow(`${path}, line 4: column "wavelength_nm" must increase strictly, found 550 after 600`);
  });
  it('a table not covering 400–700 nm names the file and the offending line', () => {
    const path = file('short.csv', 'wavelength_nm,relative_spd\n420,1\n500,1\n700,1\n');
    expect(() => resolveLight(path)).toThrow(`${path}, line 2: the table must start at or below 400 nm, first wavelength is 420 nm`);
    const path2 = file('short2.csv', 'wavelength_nm,relative_spd\n400,1\n500,1\n650,1\n');
    expect(() => resolveLight(path2)).toThrow(`${path2}, line 4: the table must reach 700 nm or beyond, last wavelength is 650 nm`);
  });
  it('a wrong column count names the file and line', () => {
    const path = file('cols.csv', 'wavelength_nm,relative_spd\n400,1\n500,1,2\n700,1\n');
    expect(() => resolveLight(path)).toThrow(`${path}, line 3: expected 2 comma-separated numbers, found 3`);
  });
  it('a missing .csv file is reported as such', () => {
    expect(() => resolveLight(join(dir, 'nope.csv'))).toThrow(/nope\.csv does not exist/);
  });
});

describe('user camera sensitivities (wavelength_nm,r,g,b)', () => {
  function cameraFile(): string {
    // Invented demo sensitivities (three Gaussian bands), for a scenario of our own.
    const rows = ['wavelength_nm,r,g,b'];
    for (let nm = 390; nm <= 720; nm += 10) {
      const band = (centre: number) => Math.exp(-(((nm - centre) / 40) ** 2)).toFixed(5);
      rows.push(`${nm},${band(600)},${band(530)},${band(460)}`);
    }
    return file('camera.csv', rows.join('\n'));
  }
  it('buildCamera() normalises so the white-balance light white gives (1, 1, 1), encoding linear', () => {
    const camera = buildCamera({ light: resolveLight('F11'), sensitivities: readCameraSensitivities(cameraFile()) });
    expect(camera.encoding).toBe('linear');
    const rgb = applyWeightsToSpectra(camera.weights, new Float64Array(camera.wavelengthsNm.length).fill(1));
    for (const v of rgb) expect(v).toBeCloseTo(1, 12);
  });
  it('with white balance left at D65 under illuminant A, red exceeds blue', () => {
    const camera = buildCamera({ light: resolveLight('A'), whiteBalance: resolveLight('D65'), sensitivities: readCameraSensitivities(cameraFile()) });
    const [r, , b] = applyWeightsToSpectra(camera.weights, new Float64Array(camera.wavelengthsNm.length).fill(1));
    expect(r / b).toBeGreaterThan(2);
  });
  it('a negative sensitivity names the file and line', () => {
    const path = file('neg.csv', 'wavelength_nm,r,g,b\n400,1,1,1\n550,1,-1,1\n700,1,1,1\n');
    expect(() => readCameraSensitivities(path)).toThrow(`${path}, line 3: sensitivity g must be >= 0, found -1`);
  });
  it('an unreadable file names the file', () => {
    expect(() => readCameraSensitivities(join(dir, 'missing.csv'))).toThrow(/missing\.csv: cannot read the file \(ENOENT\)/);
  });
});

describe('correlated colour temperatures of the named lights', () => {
  // CCT by McCamy's cubic approximation (C. S. McCamy, Color Res. Appl. 17, 142 (1992)), from our
  // 1 nm white points, against the CCT written in each light's description, which quotes the
  // CIE's listed values (CIE 15:2004 for D/A/FL, CIE 015:2018 Table 12.3 for the LEDs; from
  // memory). McCamy's formula is good to a few kelvin near the Planckian locus in this range;
  // 25 K allows for that and for our 1 nm interpolation of the 5 nm fluorescent tables.
  for (const name of LIGHT_NAMES) {
    it(`${name}: McCamy CCT within 25 K of the listed value`, () => {
      const light = resolveLight(name);
      const listed = Number(/(\d{4}) K/.exec(light.description)![1]);
      const [x, y, z] = whitePointXyz(light);
      const m = (x / (x + y + z) - 0.332) / (0.1858 - y / (x + y + z));
      const cct = 449 * m ** 3 + 3525 * m ** 2 + 6823.3 * m + 5520.33;
      expect(Math.abs(cct - listed)).toBeLessThan(25);
    });
  }
});
