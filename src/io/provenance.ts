/**
 * Provenance of an output: which Lamella made it and the SHA-256 (FIPS 180-4) of every file it
 * was made from (photo, mask, stack, material, light, camera and calibration files), so that a
 * result can be traced to its inputs and reproduced (quality systems ask for exactly this).
 */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { LAMELLA_VERSION } from '../version.js';

export async function sha256OfFile(path: string): Promise<string> {
  const hash = createHash('sha256');
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

export interface Provenance {
  readonly lamella_version: string;
  readonly node_version: string;
  /** Each input file with its role and SHA-256 ("unreadable" when it could not be read again). */
  readonly inputs: ReadonlyArray<{ readonly role: string; readonly path: string; readonly sha256: string }>;
}

export async function provenanceOf(files: ReadonlyArray<{ readonly path: string; readonly role: string }>): Promise<Provenance> {
  const seen = new Set<string>();
  const inputs: Array<{ role: string; path: string; sha256: string }> = [];
  for (const file of files) {
    if (seen.has(file.path)) continue;
    seen.add(file.path);
    inputs.push({ role: file.role, path: file.path, sha256: await sha256OfFile(file.path).catch(() => 'unreadable') });
  }
  return { lamella_version: LAMELLA_VERSION, node_version: process.version, inputs };
}
