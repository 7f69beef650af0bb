/**
 * Lamella's version (package.json `version`), for `--version` and the provenance every output
 * carries. Read once from the package's own package.json (one folder above both `src/` and `dist/`).
 */
import { readFileSync } from 'node:fs';

function readVersion(): string {
  try {
    const pkg = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { name?: string; version?: string };
    return typeof pkg.version === 'string' ? pkg.version : 'unknown';
  } catch {
    return 'unknown';
  }
}

export const LAMELLA_VERSION: string = readVersion();
