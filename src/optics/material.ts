/**
 * Building `Material` records from dispersion functions: one place that checks the valid
 * wavelength range, handles explicit extrapolation, and reports it through a callback
 * (the library never prints).
 */
import type { ComplexIndex, Material } from './types.js';

export interface MaterialOptions {
  /** Allow wavelengths outside the valid range (formulas are evaluated, tables hold their end value). */
  readonly extrapolate?: boolean;
  /** Receives one message per material the first time it is evaluated outside its valid range. */
  readonly onWarning?: (message: string) => void;
}

export interface MaterialParts {
  readonly name: string;
  readonly description: string;
  readonly source: string;
  readonly validRangeNm: readonly [number, number];
  readonly n: (wavelengthNm: number) => number;
  /** Extinction coefficient; omitted means k = 0. */
  readonly k?: (wavelengthNm: number) => number;
}

/** Wraps dispersion functions into a `Material` whose `indexAt` enforces the valid range. */
export function makeMaterial(parts: MaterialParts, options: MaterialOptions = {}): Material {
  const [fromNm, toNm] = parts.validRangeNm;
  const nAt = parts.n;
  const kAt = parts.k;
  const extrapolate = options.extrapolate === true;
  const onWarning = options.onWarning;
  let warned = false;
  const indexAt = (wavelengthNm: number): ComplexIndex => {
    if (!Number.isFinite(wavelengthNm) || wavelengthNm <= 0) {
      throw new RangeError(`material ${parts.name}: wavelengthNm must be a finite number > 0, received ${wavelengthNm}`);
    }
    if (wavelengthNm < fromNm || wavelengthNm > toNm) {
      if (!extrapolate) {
        throw new RangeError(
          `material ${parts.name}: wavelength ${wavelengthNm} nm is outside its valid range ${fromNm}–${toNm} nm (allow it with --extrapolate, or the extrapolate option of the library)`,
        );
      }
      if (!warned) {
        warned = true;
        onWarning?.(`material ${parts.name}: extrapolating outside its valid range ${fromNm}–${toNm} nm (first at ${wavelengthNm} nm)`);
      }
    }
    const n = nAt(wavelengthNm);
    const k = kAt === undefined ? 0 : kAt(wavelengthNm);
    return { n, k };
  };
  return {
    name: parts.name,
    description: parts.description,
    source: parts.source,
    validRangeNm: [fromNm, toNm],
    indexAt,
  };
}

/** A wavelength-independent index (real when k = 0), valid at every wavelength. */
export function constantMaterial(n: number, k = 0, name?: string): Material {
  if (!Number.isFinite(n) || n <= 0) throw new RangeError(`constant index: n must be a finite number > 0, received ${n}`);
  if (!Number.isFinite(k) || k < 0) throw new RangeError(`constant index: k must be a finite number >= 0, received ${k}`);
  const label = name ?? (k === 0 ? `n=${n}` : `n=${n},k=${k}`);
  const index: ComplexIndex = { n, k };
  return {
    name: label,
    description: `constant index ${k === 0 ? n : `${n} + ${k}i`}`,
    source: 'constant given by the user',
    validRangeNm: [0, Number.POSITIVE_INFINITY],
    indexAt: (wavelengthNm: number) => {
      if (!Number.isFinite(wavelengthNm) || wavelengthNm <= 0) {
        throw new RangeError(`material ${label}: wavelengthNm must be a finite number > 0, received ${wavelengthNm}`);
      }
      return index;
    },
  };
}

/** The same material with n(λ) multiplied by `factor` (k unchanged); used for index calibration. */
export function scaleMaterialIndex(material: Material, factor: number): Material {
  if (!Number.isFinite(factor) || factor <= 0) {
    throw new RangeError(`indexScale must be a finite number > 0, received ${factor}`);
  }
  if (factor === 1) return material;
  return {
    ...material,
    name: `${material.name}×${factor}`,
    description: `${material.description}, n scaled by ${factor}`,
    indexAt: (wavelengthNm: number) => {
      const { n, k } = material.indexAt(wavelengthNm);
      return { n: n * factor, k };
    },
  };
}
