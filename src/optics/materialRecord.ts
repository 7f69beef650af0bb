/**
 * Materials from a JSON dispersion record in the schema of `shared/materials/*.json`
 * (keys `material`, `formula` = sellmeier | cauchy | gas, `coefficients`, `k`, `valid_range_um`,
 * `source`, `doi`; see `shared/materials/SOURCES.md`, section "Formats"). The same parser serves the
 * built-in library, user material files and inline formulas in stack files.
 */
import { cauchy } from './dispersion/cauchy.js';
import { gasFormula } from './dispersion/gasFormula.js';
import { linearTable } from './dispersion/linearTable.js';
import { sellmeier } from './dispersion/sellmeier.js';
import { DataFileError } from './dataFileError.js';
import { makeMaterial, type MaterialOptions } from './material.js';
import type { Material } from './types.js';

type Json = Record<string, unknown>;

function isObject(value: unknown): value is Json {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function finiteNumber(value: unknown, file: string, field: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new DataFileError(file, `${field} must be a finite number, received ${JSON.stringify(value) ?? 'nothing'}`);
  }
  return value;
}

function numberList(value: unknown, file: string, field: string): number[] {
  if (!Array.isArray(value) || value.length === 0) {
    throw new DataFileError(file, `${field} must be a non-empty array of numbers, received ${JSON.stringify(value) ?? 'nothing'}`);
  }
  return value.map((item, i) => finiteNumber(item, file, `${field}[${i}]`));
}

function sameLength(a: number[], b: number[], file: string, fieldA: string, fieldB: string): void {
  if (a.length !== b.length) {
    throw new DataFileError(file, `${fieldA} and ${fieldB} must have the same length, received ${a.length} and ${b.length}`);
  }
}

/** Dispersion n(λ) from `formula` and a coefficient object (`coefficients` or one composition). */
export function dispersionFromRecord(formula: unknown, coefficients: unknown, file: string, field: string): (wavelengthNm: number) => number {
  if (!isObject(coefficients)) throw new DataFileError(file, `${field} must be an object with A and B, received ${JSON.stringify(coefficients) ?? 'nothing'}`);
  const A = finiteNumber(coefficients.A ?? 0, file, `${field}.A`);
  const B = numberList(coefficients.B, file, `${field}.B`);
  if (formula === 'sellmeier' || formula === 'gas') {
    const C = numberList(coefficients.C, file, `${field}.C`);
    sameLength(B, C, file, `${field}.B`, `${field}.C`);
    return formula === 'sellmeier' ? sellmeier({ A, B, C }) : gasFormula({ A, B, C });
  }
  if (formula === 'cauchy') {
    const p = numberList(coefficients.p, file, `${field}.p`);
    sameLength(B, p, file, `${field}.B`, `${field}.p`);
    return cauchy({ A, B, p });
  }
  throw new DataFileError(file, `formula must be "sellmeier", "cauchy" or "gas", received ${JSON.stringify(formula) ?? 'nothing'}`);
}

/** Valid range in nm from `valid_range_um`. */
export function validRangeFromRecord(record: Json, file: string): [number, number] {
  const range = numberList(record.valid_range_um, file, 'valid_range_um');
  if (range.length !== 2 || !(range[0] > 0) || !(range[1] > range[0])) {
    throw new DataFileError(file, `valid_range_um must be [from, to] with 0 < from < to (µm), received ${JSON.stringify(record.valid_range_um)}`);
  }
  // A range starting beyond 50 µm cannot be meant for visible light: most likely nanometres.
  if (range[0] >= 50) {
    throw new DataFileError(file, `valid_range_um must be in micrometres, received ${JSON.stringify(record.valid_range_um)} (these look like nanometres; e.g. [0.21, 6.7])`);
  }
  return [range[0] * 1000, range[1] * 1000];
}

/** k(λ) from the `k` field: 0 / absent, a constant >= 0, or `{ wavelength_um: [...], k: [...] }`. */
export function extinctionFromRecord(value: unknown, file: string): ((wavelengthNm: number) => number) | undefined {
  if (value === undefined || value === null || value === 0) return undefined;
  if (typeof value === 'number') {
    const k = finiteNumber(value, file, 'k');
    if (k < 0) throw new DataFileError(file, `k must be >= 0, received ${k}`);
    return () => k;
  }
  if (!isObject(value)) throw new DataFileError(file, `k must be 0, a number >= 0 or { wavelength_um, k }, received ${JSON.stringify(value)}`);
  const wavelengthsUm = numberList(value.wavelength_um, file, 'k.wavelength_um');
  const ks = numberList(value.k, file, 'k.k');
  sameLength(wavelengthsUm, ks, file, 'k.wavelength_um', 'k.k');
  for (let i = 0; i < ks.length; i++) {
    if (ks[i] < 0) throw new DataFileError(file, `k.k[${i}] must be >= 0, received ${ks[i]}`);
    if (i > 0 && !(wavelengthsUm[i] > wavelengthsUm[i - 1])) {
      throw new DataFileError(file, `k.wavelength_um must increase strictly, received ${wavelengthsUm[i - 1]} then ${wavelengthsUm[i]} at index ${i}`);
    }
  }
  return linearTable(wavelengthsUm.map((um) => um * 1000), ks);
}

/** Citation text from `source` and `doi`. */
export function citationFromRecord(record: Json, fallback: string): string {
  const source = typeof record.source === 'string' ? record.source : fallback;
  return typeof record.doi === 'string' && record.doi !== '' ? `${source}, doi:${record.doi}` : source;
}

/**
 * Evaluates n(λ) at a few wavelengths of the valid range (within 380–780 nm where they overlap)
 * and refuses a formula that gives no finite n in [1, 10] there: the usual sign of coefficients
 * in the wrong units (Sellmeier C in nm² instead of µm² gives n just below 1). Transparent
 * materials described by these formulas have 1 <= n, and 10 is above any of them (common
 * practice: germanium, about 4, is among the highest).
 */
function checkIndexPlausible(n: (wavelengthNm: number) => number, [fromNm, toNm]: [number, number], file: string): void {
  const lo = Math.max(fromNm, 380);
  const hi = Math.min(toNm, 780);
  const [a, b] = lo <= hi ? [lo, hi] : [fromNm, toNm];
  for (let i = 0; i <= 4; i++) {
    const wavelengthNm = a + ((b - a) * i) / 4;
    const value = n(wavelengthNm);
    if (!Number.isFinite(value) || value < 1 || value > 10) {
      throw new DataFileError(
        file,
        `coefficients give n = ${value} at ${Number(wavelengthNm.toPrecision(6))} nm, expected a finite index from 1 to 10 (check the units: wavelengths in µm, Sellmeier C in µm²)`,
      );
    }
  }
}

/** A Material from a parsed JSON record; `file` is used in error messages. */
export function materialFromRecord(record: unknown, file: string, name: string, options: MaterialOptions = {}): Material {
  if (!isObject(record)) throw new DataFileError(file, `expected a JSON object with formula, coefficients and valid_range_um`);
  if (record.formula === undefined) throw new DataFileError(file, 'missing field "formula" (sellmeier, cauchy or gas)');
  if (record.coefficients === undefined) throw new DataFileError(file, 'missing field "coefficients"');
  if (record.valid_range_um === undefined) throw new DataFileError(file, 'missing field "valid_range_um"');
  const n = dispersionFromRecord(record.formula, record.coefficients, file, 'coefficients');
  const validRangeNm = validRangeFromRecord(record, file);
  const k = extinctionFromRecord(record.k, file);
  checkIndexPlausible(n, validRangeNm, file);
  const description = typeof record.material === 'string' ? record.material : name;
  return makeMaterial({ name, description, source: citationFromRecord(record, `file ${file}`), validRangeNm, n, k }, options);
}
