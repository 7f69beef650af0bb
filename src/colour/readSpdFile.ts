/**
 * A user light from a CSV file `wavelength_nm,relative_spd` (header row required; wavelengths
 * strictly increasing; values finite and ≥ 0; the table must cover 400–700 nm). Outside the
 * table's range the light is taken as 0. Errors name the file and the line.
 */
import type { Light } from './light.js';
import { CsvFormatError, readNumericCsv } from './readNumericCsv.js';

/** The span a user spectrum or camera table must cover, in nm (common practice: the visible core). */
export const REQUIRED_COVERAGE_NM = [400, 700] as const;

/** Checks that a table's first column covers 400–700 nm; the error names the file and the line. */
export function checkCoverage(file: string, wavelengthsNm: Float64Array, dataLineOf: (row: number) => number): void {
  const first = wavelengthsNm[0];
  const last = wavelengthsNm[wavelengthsNm.length - 1];
  if (last < 50) {
    throw new CsvFormatError(file, dataLineOf(wavelengthsNm.length - 1), `wavelengths must be in nm, received ${first}–${last} (these look like micrometres; multiply by 1000)`);
  }
  if (first > REQUIRED_COVERAGE_NM[0]) {
    throw new CsvFormatError(file, dataLineOf(0), `the table must start at or below ${REQUIRED_COVERAGE_NM[0]} nm, first wavelength is ${first} nm`);
  }
  if (last < REQUIRED_COVERAGE_NM[1]) {
    throw new CsvFormatError(file, dataLineOf(wavelengthsNm.length - 1), `the table must reach ${REQUIRED_COVERAGE_NM[1]} nm or beyond, last wavelength is ${last} nm`);
  }
}

export function readSpdFile(file: string): Light {
  const table = readNumericCsv(file, 2, 'light SPD file');
  const [wavelengthsNm, relativeSpd] = table.columns;
  const lineOf = (row: number): number => table.lineNumbers[row];
  checkCoverage(file, wavelengthsNm, lineOf);
  let peak = 0;
  for (let i = 0; i < relativeSpd.length; i++) {
    if (relativeSpd[i] < 0) throw new CsvFormatError(file, lineOf(i), `relative_spd must be >= 0, found ${relativeSpd[i]}`);
    peak = Math.max(peak, relativeSpd[i]);
  }
  if (peak === 0) throw new CsvFormatError(file, lineOf(0), 'relative_spd is 0 everywhere; expected some positive power');
  return {
    name: file,
    description: `user light spectrum from ${file}`,
    source: `user file ${file}`,
    kind: 'spectrum',
    wavelengthsNm,
    relativeSpd,
  };
}
