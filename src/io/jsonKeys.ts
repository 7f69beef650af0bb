/**
 * Lamella's JSON convention (README, "JSON records"): keys in snake_case with the unit at the end
 * (`thickness_nm`, `time_s`, `area_um2`), numbers as numbers, and a `schema_version` in every record.
 * The TypeScript objects behind some records use camelCase (`darkLimitNm`); these helpers turn
 * their keys into the file's form and back.
 */

/** `darkLimitNm` → `dark_limit_nm`, `h0Nm` → `h0_nm`, `areaUm2` → `area_um2`, `wbR` → `wb_r`; snake_case stays as it is. */
export function snakeCase(name: string): string {
  return name
    .replace(/([a-z0-9])([A-Z])/g, '$1_$2')
    .replace(/([A-Z])([A-Z][a-z])/g, '$1_$2')
    .toLowerCase();
}

/** `dark_limit_nm` → `darkLimitNm` (the inverse of snakeCase for names it produced). */
export function camelCase(name: string): string {
  return name.replace(/_([a-z0-9])/g, (_, c: string) => c.toUpperCase());
}

/**
 * A deep copy of `value` with every object key in snake_case, except the keys of objects found
 * under a key named in `keepKeysOf` (maps keyed by data, such as file paths).
 */
export function snakeCaseKeys(value: unknown, keepKeysOf: ReadonlySet<string> = new Set()): unknown {
  if (Array.isArray(value)) return value.map((v) => snakeCaseKeys(v, keepKeysOf));
  if (value === null || typeof value !== 'object') return value;
  const out: Record<string, unknown> = {};
  for (const [key, v] of Object.entries(value as Record<string, unknown>)) {
    const name = snakeCase(key);
    if (keepKeysOf.has(name) && v !== null && typeof v === 'object' && !Array.isArray(v)) out[name] = { ...(v as Record<string, unknown>) };
    else out[name] = snakeCaseKeys(v, keepKeysOf);
  }
  return out;
}

/** A shallow copy of an object with its own keys (not its values' keys) in camelCase; other values as they are. */
export function camelCaseKeysShallow<T>(value: unknown): T {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return value as T;
  const out: Record<string, unknown> = {};
  for (const [key, v] of Object.entries(value as Record<string, unknown>)) out[camelCase(key)] = v;
  return out as T;
}
