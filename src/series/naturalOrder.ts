/**
 * Natural order of frame names ("frame2" before "frame10"), the order cameras and users number
 * photos in. Uses the ECMAScript Intl collator with numeric collation (ECMA-402, Intl.Collator
 * option `numeric`); ties are broken by plain code-unit order so the result is deterministic.
 */
const collator = new Intl.Collator(undefined, { numeric: true });

export function compareNatural(a: string, b: string): number {
  const byCollator = collator.compare(a, b);
  if (byCollator !== 0) return byCollator;
  return a < b ? -1 : a > b ? 1 : 0;
}
