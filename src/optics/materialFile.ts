/**
 * User materials from a file: JSON in the schema of `shared/materials/*.json` (see
 * ./materialRecord.ts) or CSV `wavelength_nm,n,k` (see ./materialTable.ts), chosen by extension.
 * Errors are `DataFileError`s naming the file and the field or line.
 */
import { readFileSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { DataFileError } from './dataFileError.js';
import { describeJsonSyntaxError, noteInputFile, regularFileProblemSync } from '../io/inputFiles.js';
import type { MaterialOptions } from './material.js';
import { materialFromRecord } from './materialRecord.js';
import { materialFromNkTable, parseNkCsv } from './materialTable.js';
import type { Material } from './types.js';

function readText(path: string, role: string): string {
  const problem = regularFileProblemSync(path);
  if (problem !== null) throw new DataFileError(path, problem);
  noteInputFile(path, role);
  try {
    return readFileSync(path, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new DataFileError(path, code === 'ENOENT' ? 'file not found' : `cannot read the file (${code ?? String(error)})`);
  }
}

/** Parses a JSON file, naming the file in the error. */
export function readJsonFile(path: string, role = 'material file'): unknown {
  const text = readText(path, role);
  try {
    return JSON.parse(text) as unknown;
  } catch (error) {
    throw new DataFileError(path, `not valid JSON (${describeJsonSyntaxError(error)})`);
  }
}

/** A material from a `.json` formula record or a `.csv` n,k table. */
export function loadMaterialFile(path: string, options: MaterialOptions = {}): Material {
  if (typeof path !== 'string' || path === '') throw new TypeError(`material file path must be a non-empty string, received ${JSON.stringify(path)}`);
  const extension = extname(path).toLowerCase();
  if (extension === '.csv') {
    const table = parseNkCsv(readText(path, 'material file'), path);
    return materialFromNkTable(table, { name: path, description: `n, k table from ${basename(path)}`, source: `user file ${path}` }, options);
  }
  if (extension === '.json') return materialFromRecord(readJsonFile(path), path, path, options);
  throw new DataFileError(path, `material files must end in .json (formula) or .csv (wavelength_nm,n,k), received "${extension || 'no extension'}"`);
}
