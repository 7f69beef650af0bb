/**
 * Parsers for the geometric options: `--region X,Y,W,H`, `--anchor X,Y=NM`, `--known X,Y,W,H=NM`.
 * Pixels of the upright photo; errors name the option and show the expected form.
 */
import { UsageError } from './errors.js';
import { parseDecimal } from './parseDecimal.js';

function numbers(text: string, count: number, option: string, form: string): number[] {
  const parts = text.split(',').map((p) => p.trim());
  const values = parts.map(parseDecimal);
  if (parts.length !== count || parts.some((p) => p === '') || values.some((v) => !Number.isFinite(v))) {
    throw new UsageError(`${option} must be ${form}, received ${JSON.stringify(text)}`);
  }
  return values;
}

export function parseRegion(text: string, option = '--region'): [number, number, number, number] {
  const form = 'X,Y,W,H in pixels (whole numbers, W and H > 0)';
  const [x, y, w, h] = numbers(text, 4, option, form);
  if (![x, y, w, h].every(Number.isInteger) || x < 0 || y < 0 || w <= 0 || h <= 0) {
    throw new UsageError(`${option} must be ${form}, received ${JSON.stringify(text)}`);
  }
  return [x, y, w, h];
}

function splitValue(text: string, option: string, form: string): [string, number] {
  const at = text.lastIndexOf('=');
  if (at < 0) throw new UsageError(`${option} must be ${form}, received ${JSON.stringify(text)}`);
  const valueText = text.slice(at + 1).trim().replace(/nm$/i, '');
  const value = parseDecimal(valueText);
  if (valueText === '' || !Number.isFinite(value) || value < 0) {
    throw new UsageError(`${option} thickness must be a number of nm >= 0, received ${JSON.stringify(text.slice(at + 1))}`);
  }
  return [text.slice(0, at), value];
}

export function parseAnchor(text: string): { x: number; y: number; thicknessNm: number } {
  const form = 'X,Y=NM (a pixel and its known thickness in nm)';
  const [where, thicknessNm] = splitValue(text, '--anchor', form);
  const [x, y] = numbers(where, 2, '--anchor', form);
  if (!Number.isInteger(x) || !Number.isInteger(y) || x < 0 || y < 0) {
    throw new UsageError(`--anchor must be ${form}, received ${JSON.stringify(text)}`);
  }
  return { x, y, thicknessNm };
}

export function parseKnown(text: string): { region: [number, number, number, number]; thicknessNm: number } {
  const form = 'X,Y,W,H=NM (a rectangle in pixels and its known thickness in nm)';
  const [where, thicknessNm] = splitValue(text, '--known', form);
  return { region: parseRegion(where, '--known'), thicknessNm };
}

/** Collector for repeatable commander options. */
export function collect(value: string, previous: string[] | undefined): string[] {
  return [...(previous ?? []), value];
}
