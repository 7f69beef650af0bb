/**
 * A thickness specification (`--spec NOMINAL±TOL` or `--spec MIN-MAX`, nm) and the rule that
 * turns a map into a pass/fail verdict (`--pass-if in-spec>=99%` | `mean` | `all`).
 */
import { UsageError } from '../errors.js';

export interface ThicknessSpec {
  /** Lowest thickness in spec, nm (inclusive). */
  readonly minNm: number;
  /** Highest thickness in spec, nm (inclusive). */
  readonly maxNm: number;
  /** The nominal value when the spec was given as NOMINAL±TOL, else null. */
  readonly nominalNm: number | null;
  /** The tolerance when the spec was given as NOMINAL±TOL, else null. */
  readonly toleranceNm: number | null;
  /** As the user wrote it (normalised: `100±5 nm`, `95-105 nm`). */
  readonly text: string;
}

/**
 * How a map passes: `in-spec`: at least `minShare` of the inspected film area is measured and in
 * spec; `mean`: the mean thickness lies in spec; `all`: every inspected film pixel is measured and in spec.
 */
export type PassRule = { readonly kind: 'in-spec'; readonly minShare: number } | { readonly kind: 'mean' } | { readonly kind: 'all' };

export const DEFAULT_PASS_RULE: PassRule = { kind: 'in-spec', minShare: 0.99 };

const NUMBER = String.raw`[-+]?(?:\d+(?:\.\d*)?|\.\d+)`;
const TOLERANCE_FORM = new RegExp(`^\\s*(${NUMBER})\\s*(?:±|\\+-|\\+/-)\\s*(${NUMBER})\\s*(%)?\\s*(?:nm)?\\s*$`, 'i');
const RANGE_FORM = new RegExp(`^\\s*(${NUMBER})\\s*(?:-|–|\\.\\.)\\s*(${NUMBER})\\s*(?:nm)?\\s*$`, 'i');

/**
 * Parses `NOMINAL±TOL` (also `NOMINAL+-TOL`, `NOMINAL+/-TOL`; TOL in nm, or in % of NOMINAL with a
 * `%`) or `MIN-MAX`, in nm. A negative value, a negative tolerance or MIN ≥ MAX is a usage error
 * naming the option.
 */
export function parseSpec(text: string, option = '--spec'): ThicknessSpec {
  const quoted = JSON.stringify(text);
  const tol = TOLERANCE_FORM.exec(text);
  if (tol) {
    const nominalNm = Number(tol[1]);
    let toleranceNm = Number(tol[2]);
    if (tol[2].trim().startsWith('-') || toleranceNm < 0) throw new UsageError(`${option}: the tolerance must not be negative (NOMINAL±TOL in nm, e.g. 100±5), received ${quoted}`);
    if (!(nominalNm > 0)) throw new UsageError(`${option}: the nominal thickness must be a number of nm > 0, received ${quoted}`);
    if (tol[3]) toleranceNm = (nominalNm * toleranceNm) / 100;
    if (!(toleranceNm > 0)) throw new UsageError(`${option}: the tolerance must be > 0 nm, received ${quoted}`);
    if (nominalNm - toleranceNm < 0) throw new UsageError(`${option}: NOMINAL−TOL is below 0 nm, received ${quoted}`);
    return { minNm: nominalNm - toleranceNm, maxNm: nominalNm + toleranceNm, nominalNm, toleranceNm, text: `${fmt(nominalNm)}±${fmt(toleranceNm)} nm` };
  }
  const range = RANGE_FORM.exec(text);
  if (range) {
    const minNm = Number(range[1]);
    const maxNm = Number(range[2]);
    if (minNm < 0 || maxNm < 0) throw new UsageError(`${option}: MIN-MAX must not be negative (nm), received ${quoted}`);
    if (!(minNm < maxNm)) throw new UsageError(`${option}: MIN must be below MAX (MIN-MAX in nm), received ${quoted}`);
    return { minNm, maxNm, nominalNm: null, toleranceNm: null, text: `${fmt(minNm)}-${fmt(maxNm)} nm` };
  }
  throw new UsageError(`${option} must be NOMINAL±TOL (e.g. 100±5, 100+-5 or 100±5%) or MIN-MAX (e.g. 95-105), in nm; received ${quoted}`);
}

/** Parses `in-spec>=P%` (P from 0 to 100), `mean` or `all`. */
export function parsePassRule(text: string, option = '--pass-if'): PassRule {
  const t = text.trim().toLowerCase();
  if (t === 'mean') return { kind: 'mean' };
  if (t === 'all') return { kind: 'all' };
  const m = /^in-spec\s*>=\s*(\d+(?:\.\d*)?|\.\d+)\s*%$/.exec(t);
  if (m) {
    const percent = Number(m[1]);
    if (percent >= 0 && percent <= 100) return { kind: 'in-spec', minShare: percent / 100 };
  }
  throw new UsageError(`${option} must be in-spec>=P% (P from 0 to 100, e.g. in-spec>=99%), mean or all; received ${JSON.stringify(text)}`);
}

/** The rule as the user writes it. */
export function passRuleText(rule: PassRule): string {
  return rule.kind === 'in-spec' ? `in-spec>=${fmt(rule.minShare * 100)}%` : rule.kind;
}

/**
 * The thickness range the order search keeps to when a spec is given without `--expect`: the
 * spec widened by its own width on each side (and at least 20 % of its middle), so film somewhat
 * out of spec is still measured (and counted out of spec) rather than left without an estimate.
 */
export function specSearchRangeNm(spec: ThicknessSpec, maxThicknessNm: number): [number, number] {
  const width = spec.maxNm - spec.minNm;
  const margin = Math.max(width, 0.2 * ((spec.minNm + spec.maxNm) / 2));
  const lo = Math.max(0, spec.minNm - margin);
  const hi = Math.min(maxThicknessNm, spec.maxNm + margin);
  return [lo, Math.max(hi, Math.min(maxThicknessNm, lo + 1))];
}

function fmt(v: number): string {
  return String(Math.round(v * 1000) / 1000);
}
