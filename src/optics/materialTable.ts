/**
 * Materials from a tabulated CSV `wavelength_nm,n,k` (vacuum wavelength increasing down the file,
 * no comment lines), interpolated linearly: the format of `shared/materials/*.csv`, described in
 * `shared/materials/SOURCES.md`. The valid range is the span of the table.
 */
import { linearTable } from './dispersion/linearTable.js';
import { DataFileError } from './dataFileError.js';
import { showCell } from '../io/inputFiles.js';
import { makeMaterial, type MaterialOptions } from './material.js';
import type { Material } from './types.js';

export interface NkTable {
  readonly wavelengthsNm: Float64Array;
  readonly n: Float64Array;
  readonly k: Float64Array;
}

/** Parses and checks the CSV text; errors name the file and the line (1-based). */
export function parseNkCsv(text: string, file: string): NkTable {
  const lines = text.replace(/^\uFEFF/, '').split(/\r?\n/);
  const header = lines[0].trim().toLowerCase().replace(/\s+/g, '');
  if (header !== 'wavelength_nm,n,k') {
    throw new DataFileError(file, `line 1: expected the header "wavelength_nm,n,k", received a first line of ${lines[0].trim().length} characters`);
  }
  const wl: number[] = [];
  const ns: number[] = [];
  const ks: number[] = [];
  for (let i = 1; i < lines.length; i++) {
    const line = lines[i].trim();
    if (line === '') continue;
    const cells = line.split(',');
    const where = `line ${i + 1}`;
    if (cells.length !== 3) throw new DataFileError(file, `${where}: expected 3 values (wavelength_nm,n,k), received ${cells.length}`);
    const [w, n, k] = cells.map((cell) => (cell.trim() === '' ? Number.NaN : Number(cell)));
    if (!Number.isFinite(w) || w <= 0) throw new DataFileError(file, `${where}: wavelength_nm must be a finite number > 0, received ${showCell(cells[0])}`);
    if (!Number.isFinite(n) || n <= 0) throw new DataFileError(file, `${where}: n must be a finite number > 0, received ${showCell(cells[1])}`);
    if (!Number.isFinite(k)) throw new DataFileError(file, `${where}: k must be a finite number, received ${showCell(cells[2])}`);
    if (k < 0) throw new DataFileError(file, `${where}: k must be >= 0, received ${k}`);
    if (wl.length > 0 && !(w > wl[wl.length - 1])) {
      throw new DataFileError(file, `${where}: wavelengths must increase strictly, received ${w} nm after ${wl[wl.length - 1]} nm`);
    }
    wl.push(w);
    ns.push(n);
    ks.push(k);
  }
  if (wl.length < 2) throw new DataFileError(file, `expected at least 2 data lines, received ${wl.length}`);
  // No optical table for visible light ends below 50 nm: such wavelengths are micrometres.
  if (wl[wl.length - 1] < 50) {
    throw new DataFileError(file, `wavelength_nm must be in nanometres, received ${wl[0]}–${wl[wl.length - 1]} (these look like micrometres; multiply by 1000)`);
  }
  return { wavelengthsNm: Float64Array.from(wl), n: Float64Array.from(ns), k: Float64Array.from(ks) };
}

/** A Material interpolating the table; `description`/`source` default to the file name. */
export function materialFromNkTable(
  table: NkTable,
  info: { name: string; description: string; source: string },
  options: MaterialOptions = {},
): Material {
  const last = table.wavelengthsNm.length - 1;
  return makeMaterial(
    {
      ...info,
      validRangeNm: [table.wavelengthsNm[0], table.wavelengthsNm[last]],
      n: linearTable(table.wavelengthsNm, table.n),
      k: linearTable(table.wavelengthsNm, table.k),
    },
    options,
  );
}
