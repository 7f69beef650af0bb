/**
 * A user camera's spectral sensitivities from a CSV file `wavelength_nm,r,g,b` (header row
 * required; wavelengths strictly increasing; values finite and ≥ 0; the table must cover
 * 400–700 nm; 0 is assumed outside it). Scale is arbitrary: buildCamera normalises it.
 */
import { CsvFormatError, readNumericCsv } from './readNumericCsv.js';
import { checkCoverage } from './readSpdFile.js';

export interface CameraSensitivities {
  readonly name: string;
  readonly wavelengthsNm: Float64Array;
  /** Sensitivities of the raw red, green and blue channels at `wavelengthsNm`. */
  readonly r: Float64Array;
  readonly g: Float64Array;
  readonly b: Float64Array;
}

export function readCameraSensitivities(file: string): CameraSensitivities {
  const table = readNumericCsv(file, 4, 'camera file');
  const [wavelengthsNm, r, g, b] = table.columns;
  const lineOf = (row: number): number => table.lineNumbers[row];
  checkCoverage(file, wavelengthsNm, lineOf);
  const names = ['r', 'g', 'b'];
  [r, g, b].forEach((column, c) => {
    let peak = 0;
    for (let i = 0; i < column.length; i++) {
      if (column[i] < 0) throw new CsvFormatError(file, lineOf(i), `sensitivity ${names[c]} must be >= 0, found ${column[i]}`);
      peak = Math.max(peak, column[i]);
    }
    if (peak === 0) throw new CsvFormatError(file, lineOf(0), `sensitivity ${names[c]} is 0 everywhere; expected a response somewhere`);
  });
  return { name: file, wavelengthsNm, r, g, b };
}
