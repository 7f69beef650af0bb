/**
 * `lamella map --outputs LIST`: which files to write per photo, by name (comma-separated). The
 * names and the files they stand for are in the README; an unknown or empty name is a usage error.
 */
import { UsageError } from './errors.js';
import { MAP_OUTPUT_NAMES, type MapOutputName } from '../map/outputNames.js';

export { MAP_OUTPUT_FILES, MAP_OUTPUT_NAMES, type MapOutputName } from '../map/outputNames.js';

export const OUTPUTS_HELP = `which files to write per photo, comma-separated from ${MAP_OUTPUT_NAMES.join(',')} (default: all)`;

export function parseOutputsOption(value: string | undefined): Set<MapOutputName> {
  if (value === undefined) return new Set(MAP_OUTPUT_NAMES);
  const names = value.split(',').map((name) => name.trim());
  const unknown = names.filter((name) => !(MAP_OUTPUT_NAMES as string[]).includes(name));
  if (names.length === 0 || unknown.length > 0) {
    const what = unknown.length > 0 && unknown.some((n) => n !== '') ? `unknown name(s) ${unknown.filter((n) => n !== '').map((n) => JSON.stringify(n)).join(', ')}` : 'an empty name';
    throw new UsageError(`--outputs ${JSON.stringify(value)}: ${what}; choose from ${MAP_OUTPUT_NAMES.join(', ')}`);
  }
  return new Set(names as MapOutputName[]);
}
