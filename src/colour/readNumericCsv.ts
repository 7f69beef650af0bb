/**
 * Reader for the small numeric CSV tables Lamella uses (colour-matching functions, light
 * spectra, camera sensitivities): one header row, comma-separated numbers, first column an
 * axis that must increase strictly. Blank lines and lines starting with `#` are skipped.
 * Errors name the file and the 1-based line, and say what was expected and what was found.
 */
import { readFileSync } from 'node:fs';
import { noteInputFile, regularFileProblemSync, showCell } from '../io/inputFiles.js';

export interface NumericCsv {
  readonly header: readonly string[];
  /** One Float64Array per column, in header order. */
  readonly columns: readonly Float64Array[];
  /** 1-based file line of each data row, for messages. */
  readonly lineNumbers: readonly number[];
}

/** Thrown for a malformed table; `file` and `line` (1-based; 0 = the file as a whole) locate the problem. */
export class CsvFormatError extends Error {
  override readonly name = 'CsvFormatError';
  constructor(
    readonly file: string,
    readonly line: number,
    detail: string,
  ) {
    super(line > 0 ? `${file}, line ${line}: ${detail}` : `${file}: ${detail}`);
  }
}

/**
 * Parses CSV text. `expectedColumns` is the column count required (header included);
 * `file` is used in messages only.
 */
export function parseNumericCsv(text: string, file: string, expectedColumns: number): NumericCsv {
  const lines = text.split(/\r?\n/);
  let header: string[] | null = null;
  const rows: number[][] = [];
  const lineNumbers: number[] = [];
  let previousAxis = -Infinity;
  for (let index = 0; index < lines.length; index++) {
    const raw = lines[index].trim();
    if (raw === '' || raw.startsWith('#')) continue;
    const lineNumber = index + 1;
    const cells = raw.split(',').map((cell) => cell.trim());
    if (header === null) {
      header = cells;
      if (cells.length !== expectedColumns) {
        throw new CsvFormatError(file, lineNumber, `expected a header of ${expectedColumns} columns, found ${cells.length}`);
      }
      continue;
    }
    if (cells.length !== expectedColumns) {
      throw new CsvFormatError(file, lineNumber, `expected ${expectedColumns} comma-separated numbers, found ${cells.length}`);
    }
    const values = cells.map(Number);
    for (let c = 0; c < values.length; c++) {
      if (cells[c] === '' || !Number.isFinite(values[c])) {
        throw new CsvFormatError(file, lineNumber, `column "${header[c]}" must be a finite number, found ${showCell(cells[c])}`);
      }
    }
    if (!(values[0] > previousAxis)) {
      throw new CsvFormatError(file, lineNumber, `column "${header[0]}" must increase strictly, found ${values[0]} after ${previousAxis}`);
    }
    previousAxis = values[0];
    rows.push(values);
    lineNumbers.push(lineNumber);
  }
  if (header === null) throw new CsvFormatError(file, 1, 'the file is empty; expected a header row and data rows');
  if (rows.length < 2) throw new CsvFormatError(file, lines.length, `expected at least 2 data rows, found ${rows.length}`);
  const columns = header.map((_, c) => Float64Array.from(rows, (row) => row[c]));
  return { header, columns, lineNumbers };
}

/** Reads and parses a CSV file; an unreadable file throws with the path in the message. */
export function readNumericCsv(file: string, expectedColumns: number, role = 'data file'): NumericCsv {
  const problem = regularFileProblemSync(file);
  if (problem === 'file not found') throw new CsvFormatError(file, 0, 'cannot read the file (ENOENT)');
  if (problem !== null) throw new CsvFormatError(file, 0, problem);
  noteInputFile(file, role);
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (error) {
    const reason = error instanceof Error && 'code' in error ? String((error as NodeJS.ErrnoException).code) : String(error);
    throw new CsvFormatError(file, 0, `cannot read the file (${reason})`);
  }
  return parseNumericCsv(text, file, expectedColumns);
}
