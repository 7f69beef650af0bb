/**
 * The one way the CLI reads a number a user typed: plain decimal notation only (`12`, `-0.5`,
 * `.25`, `1.5e3`), so `0x10`, `0b11`, `0o7`, `Infinity` or a blank are not numbers, as a user
 * would expect, although JavaScript's Number() accepts them. Returns NaN for anything else.
 */
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function parseDecimal(text: string): number {
  const trimmed = text.trim();
  return DECIMAL.test(trimmed) ? Number(trimmed) : Number.NaN;
}
