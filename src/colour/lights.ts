/**
 * The lights Lamella knows by name, as data records, and `resolveLight(spec)`, which also
 * accepts `blackbody:<K>`, `line:<nm>` and a user SPD CSV file.
 * Sources: CIE standard illuminants D65, D50, A (ISO/CIE 11664-2:2022, 1 nm), fluorescent
 * FL2/FL7/FL11 (CIE 15:2004 Table T.6, 5 nm; the CIE writes them F2, F7, F11 in older texts,
 * both spellings are accepted), LED illuminants (CIE 015:2018 Tables 12.1–12.2, 1 nm).
 * See shared/cie/SOURCES.md for DOIs and checksums. The CCTs in the descriptions are the CIE's listed
 * values (from memory; checked in the tests against McCamy's approximation from our white points).
 */
import { existsSync } from 'node:fs';
import { sharedPath } from '../data/sharedDir.js';
import type { Light } from './light.js';
import { C2_CIE_M_K, checkTemperatureK, planckRelativeSpd } from './planck.js';
import { readNumericCsv } from './readNumericCsv.js';
import { readSpdFile } from './readSpdFile.js';

interface TabulatedLightInfo {
  readonly file: string;
  readonly description: string;
  readonly source: string;
}

const LED_SOURCE = 'CIE 015:2018 Tables 12.1–12.2, CIE data set DOI 10.25039/CIE.DS.dhcw57sd';
const FL_SOURCE = 'CIE 15:2004 Table T.6 (5 nm)';

export const TABULATED_LIGHTS = {
  D65: { file: 'illuminant_D65.csv', description: 'CIE standard illuminant D65 (average daylight, 6504 K)', source: 'ISO/CIE 11664-2:2022 Table B.1, DOI 10.25039/CIE.DS.hjfjmt59' },
  D50: { file: 'illuminant_D50.csv', description: 'CIE illuminant D50 (horizon daylight, 5003 K; graphic arts viewing)', source: 'CIE data set DOI 10.25039/CIE.DS.etgmuqt5' },
  A: { file: 'illuminant_A.csv', description: 'CIE standard illuminant A (tungsten filament, 2856 K)', source: 'ISO/CIE 11664-2:2022 Table A.1, DOI 10.25039/CIE.DS.8jsxjrsn' },
  F2: { file: 'illuminant_F2.csv', description: 'CIE illuminant FL2 (cool white halophosphate fluorescent, 4230 K)', source: FL_SOURCE },
  F7: { file: 'illuminant_F7.csv', description: 'CIE illuminant FL7 (broadband daylight fluorescent, 6500 K)', source: FL_SOURCE },
  F11: { file: 'illuminant_F11.csv', description: 'CIE illuminant FL11 (narrow tri-band fluorescent, 4000 K)', source: FL_SOURCE },
  'LED-B1': { file: 'illuminant_LED-B1.csv', description: 'CIE LED illuminant B1 (phosphor-converted blue, 2733 K)', source: LED_SOURCE },
  'LED-B2': { file: 'illuminant_LED-B2.csv', description: 'CIE LED illuminant B2 (phosphor-converted blue, 2998 K)', source: LED_SOURCE },
  'LED-B3': { file: 'illuminant_LED-B3.csv', description: 'CIE LED illuminant B3 (phosphor-converted blue, 4103 K)', source: LED_SOURCE },
  'LED-B4': { file: 'illuminant_LED-B4.csv', description: 'CIE LED illuminant B4 (phosphor-converted blue, 5109 K)', source: LED_SOURCE },
  'LED-B5': { file: 'illuminant_LED-B5.csv', description: 'CIE LED illuminant B5 (phosphor-converted blue, 6598 K)', source: LED_SOURCE },
  'LED-BH1': { file: 'illuminant_LED-BH1.csv', description: 'CIE LED illuminant BH1 (blue + red hybrid, 2851 K)', source: LED_SOURCE },
  'LED-RGB1': { file: 'illuminant_LED-RGB1.csv', description: 'CIE LED illuminant RGB1 (red-green-blue mix, 2840 K)', source: LED_SOURCE },
  'LED-V1': { file: 'illuminant_LED-V1.csv', description: 'CIE LED illuminant V1 (phosphor-converted violet, 2724 K)', source: LED_SOURCE },
  'LED-V2': { file: 'illuminant_LED-V2.csv', description: 'CIE LED illuminant V2 (phosphor-converted violet, 4070 K)', source: LED_SOURCE },
} as const satisfies Record<string, TabulatedLightInfo>;

export type TabulatedLightName = keyof typeof TABULATED_LIGHTS;
export const LIGHT_NAMES = Object.keys(TABULATED_LIGHTS) as TabulatedLightName[];

/** Alternative spellings accepted on input (CIE 015:2018 writes the fluorescents FL2, FL7, FL11). */
const ALIASES: Record<string, TabulatedLightName> = { FL2: 'F2', FL7: 'F7', FL11: 'F11' };

/** Lowest and highest wavelength (nm) a `line:<nm>` light may have: the span of the CIE observers. */
export const LINE_RANGE_NM = [360, 830] as const;

const cache = new Map<string, Light>();

function tabulatedLight(name: TabulatedLightName): Light {
  let light = cache.get(name);
  if (!light) {
    const info: TabulatedLightInfo = TABULATED_LIGHTS[name];
    const table = readNumericCsv(sharedPath('cie', info.file), 2);
    light = { name, description: info.description, source: info.source, kind: 'spectrum', wavelengthsNm: table.columns[0], relativeSpd: table.columns[1] };
    cache.set(name, light);
  }
  return light;
}

/** A blackbody light (Planck's law with the CIE's c2), sampled at 1 nm over 300–830 nm. */
export function blackbodyLight(temperatureK: number): Light {
  checkTemperatureK(temperatureK);
  const count = 531;
  const wavelengthsNm = new Float64Array(count);
  const relativeSpd = new Float64Array(count);
  for (let i = 0; i < count; i++) {
    wavelengthsNm[i] = 300 + i;
    relativeSpd[i] = planckRelativeSpd(wavelengthsNm[i], temperatureK);
  }
  return {
    name: `blackbody:${temperatureK}`,
    description: `blackbody (Planckian radiator) at ${temperatureK} K`,
    source: `Planck's law, c2 = ${C2_CIE_M_K} m·K (CIE 15:2004 §3.1)`,
    kind: 'spectrum',
    wavelengthsNm,
    relativeSpd,
  };
}

/** An ideal monochromatic line (sodium 589.3, mercury 546.1, a laser…). */
export function lineLight(wavelengthNm: number): Light {
  if (!Number.isFinite(wavelengthNm) || wavelengthNm < LINE_RANGE_NM[0] || wavelengthNm > LINE_RANGE_NM[1]) {
    throw new RangeError(`line wavelength must be a number of nm between ${LINE_RANGE_NM[0]} and ${LINE_RANGE_NM[1]}, received ${wavelengthNm}`);
  }
  return {
    name: `line:${wavelengthNm}`,
    description: `monochromatic line at ${wavelengthNm} nm`,
    source: 'ideal single-wavelength line',
    kind: 'line',
    wavelengthsNm: Float64Array.of(wavelengthNm),
    relativeSpd: Float64Array.of(1),
    lineNm: wavelengthNm,
  };
}

function validLightsText(): string {
  return `${LIGHT_NAMES.join(', ')}, blackbody:<K>, line:<nm>, or a CSV file with columns wavelength_nm,relative_spd`;
}

/**
 * Resolves a light specification: a CIE name (case-insensitive), `blackbody:<K>`, `line:<nm>`,
 * or the path of an SPD CSV file. Unknown names throw a RangeError listing the valid ones;
 * malformed files throw a CsvFormatError naming the file and line.
 */
export function resolveLight(spec: string): Light {
  if (typeof spec !== 'string') throw new TypeError(`light must be a string, received ${typeof spec}`);
  const trimmed = spec.trim();
  const upper = trimmed.toUpperCase();
  const named = LIGHT_NAMES.find((name) => name.toUpperCase() === upper) ?? ALIASES[upper];
  if (named) return tabulatedLight(named);
  const lower = trimmed.toLowerCase();
  if (lower.startsWith('blackbody:')) {
    const value = trimmed.slice('blackbody:'.length).replace(/k$/i, '');
    return blackbodyLight(value.trim() === '' ? NaN : Number(value));
  }
  if (lower.startsWith('line:')) {
    const value = trimmed.slice('line:'.length).replace(/nm$/i, '');
    return lineLight(value.trim() === '' ? NaN : Number(value));
  }
  if (/\.(csv|txt)$/i.test(trimmed) || existsSync(trimmed)) {
    if (!existsSync(trimmed)) throw new RangeError(`light file ${trimmed} does not exist; light must be ${validLightsText()}`);
    return readSpdFile(trimmed);
  }
  throw new RangeError(`unknown light "${spec}"; light must be one of ${validLightsText()}`);
}
