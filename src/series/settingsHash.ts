/**
 * Fingerprint of the settings that shape a frame's result: canonical JSON (object keys sorted,
 * undefined dropped) hashed with SHA-256 (FIPS 180-4), first 16 hex digits. Stored in each frame's
 * JSON; a rerun redoes frames whose fingerprint differs.
 */
import { createHash } from 'node:crypto';

export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') {
    if (typeof value === 'number' && !Number.isFinite(value)) return 'null';
    return JSON.stringify(value) ?? 'null';
  }
  if (Array.isArray(value)) return `[${value.map((v) => canonicalJson(v)).join(',')}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined && typeof v !== 'function')
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
}

export function settingsHash(settings: unknown): string {
  return createHash('sha256').update(canonicalJson(settings)).digest('hex').slice(0, 16);
}
