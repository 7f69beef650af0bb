/**
 * Shape checks shared by both reports: errors name the field, what was expected and what was
 * received (TypeError for a wrong type, RangeError for an out-of-range value).
 */

export function describeValue(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'an array';
  if (typeof value === 'object') return (value as object).constructor?.name ?? 'object';
  if (typeof value === 'string') return JSON.stringify(value.length > 40 ? `${value.slice(0, 40)}…` : value);
  return `${typeof value} ${String(value)}`;
}

export function checkString(value: unknown, name: string): asserts value is string {
  if (typeof value !== 'string') throw new TypeError(`${name} must be a string, received ${describeValue(value)}`);
}

export function checkStringArray(value: unknown, name: string): asserts value is string[] {
  if (!Array.isArray(value)) throw new TypeError(`${name} must be an array of strings, received ${describeValue(value)}`);
  value.forEach((v, i) => checkString(v, `${name}[${i}]`));
}

export function checkRecord(value: unknown, name: string, nullable = false): void {
  if (nullable && (value === null || value === undefined)) return;
  if (value === null || typeof value !== 'object' || Array.isArray(value)) {
    throw new TypeError(`${name} must be an object${nullable ? ' or null' : ''}, received ${describeValue(value)}`);
  }
}

export function checkFiniteOrNull(value: unknown, name: string): void {
  if (value === null) return;
  if (typeof value !== 'number') throw new TypeError(`${name} must be a number or null, received ${describeValue(value)}`);
  if (!Number.isFinite(value)) throw new RangeError(`${name} must be finite or null, received ${value}`);
}
