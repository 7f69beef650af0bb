/**
 * Location of the project's reference data folder (`shared/` at the package root).
 * Works from `src/data/` (tests, via vitest) and `dist/data/` (compiled CLI) alike,
 * because both sit two levels below the package root.
 */
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';

export const sharedDir: string = fileURLToPath(new URL('../../shared/', import.meta.url));

/** Absolute path of a file inside `shared/`, e.g. `sharedPath('cie', 'illuminant_D65.csv')`. */
export function sharedPath(...parts: string[]): string {
  return join(sharedDir, ...parts);
}
