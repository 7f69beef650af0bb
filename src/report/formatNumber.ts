/**
 * Number formatting for the report's text (tables, labels). `—` stands for "no value"
 * (null, NaN, ±Infinity). Plain functions with no locale, so the output is the same everywhere.
 */

export const noValue = '—';

/** A finite number with `decimals` decimals, or `—`. Negative zero prints as 0. */
export function formatFixed(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return noValue;
  const text = value.toFixed(decimals);
  return /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
}

/** Thickness with 1 decimal and the unit: `123.4 nm`, or `—`. */
export function formatNm(value: number | null | undefined): string {
  const text = formatFixed(value, 1);
  return text === noValue ? text : `${text} nm`;
}

/** A share 0..1 as a percentage with 1 decimal: `12.5 %`, or `—`. */
export function formatPercent(share: number | null | undefined): string {
  const text = formatFixed(share === null || share === undefined ? share : share * 100, 1);
  return text === noValue ? text : `${text} %`;
}

/**
 * A number of any size with about `significant` significant digits, without exponent for
 * ordinary magnitudes (1e-4 ≤ |v| < 1e7), and with exponent (`1.23e-6`) outside them.
 */
export function formatSignificant(value: number | null | undefined, significant = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return noValue;
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e7 || magnitude < 1e-4) return value.toExponential(significant - 1).replace('e+', 'e');
  if (Number.isInteger(value)) return String(value);
  const decimals = Math.max(0, significant - 1 - Math.floor(Math.log10(magnitude)));
  return String(Number(value.toFixed(decimals)));
}

/**
 * Shortest decimal text that reads back as the same float32 value (`Math.fround`): the value a
 * float32 `.npy` file stores, printed without float64 noise (0.1f prints `0.1`, not
 * `0.10000000149011612`). Self-contained so the page script can embed it via `toString()`.
 */
export function shortestFloat32Text(value: number): string {
  if (!isFinite(value)) return String(value);
  for (let digits = 1; digits <= 9; digits++) {
    const text = String(Number(value.toPrecision(digits)));
    if (Math.fround(Number(text)) === value) return text;
  }
  return String(value);
}
