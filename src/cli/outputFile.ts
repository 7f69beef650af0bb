/**
 * The one check every single-file output (`calibrate --out`, `chart --out`, `render --out`) makes
 * before any work: not one of the inputs, not a folder, and not an existing file unless the user
 * says `--force` (nothing is overwritten by surprise). The write itself is atomic elsewhere.
 */
import { stat } from 'node:fs/promises';
import { assertNoInputOverwritten } from '../io/ensureOutputDir.js';
import { InputError } from './errors.js';

export async function checkOutputFile(path: string, options: { force: boolean; inputs: readonly string[]; example: string }): Promise<void> {
  assertNoInputOverwritten(options.inputs, [path]);
  const existing = await stat(path).catch(() => null);
  if (existing?.isDirectory()) throw new InputError(path, `--out is a folder; give a file name such as ${options.example}`);
  if (existing && !options.force) throw new InputError(path, 'exists already; add --force to replace it');
}
