/**
 * Glycerol–water mixtures from the Cauchy fits of Gupta et al. 2022 (Adv. Photonics Res. 3,
 * 2200152, supporting information, doi:10.1002/adpr.202200152) at 0, 20, 50 and 100 wt% glycerol
 * (`shared/materials/glycerol_water_gupta2022.json`).
 * Between measured compositions n is interpolated linearly in weight fraction, piecewise between
 * the two neighbouring compositions at each wavelength. A straight 0–100 wt% line would overestimate
 * n by about 0.004 at 20 wt% and 0.007 at 50 wt% (note in the JSON file), so it is not used.
 */
import { dispersionFromRecord, validRangeFromRecord, citationFromRecord } from './materialRecord.js';
import { DataFileError } from './dataFileError.js';
import { makeMaterial, type MaterialOptions } from './material.js';
import type { Material } from './types.js';

/** Builds `glycerol-water:<weightPercent>` from the parsed JSON record. */
export function glycerolWaterMaterial(record: unknown, file: string, weightPercent: number, options: MaterialOptions = {}): Material {
  if (!Number.isFinite(weightPercent) || weightPercent < 0 || weightPercent > 100) {
    throw new RangeError(`glycerol-water: weight percent of glycerol must be a number in [0, 100], received ${weightPercent}`);
  }
  const rec = record as Record<string, unknown>;
  const list = rec.coefficients_by_composition;
  if (!Array.isArray(list) || list.length < 2) throw new DataFileError(file, 'coefficients_by_composition must list at least two compositions');
  const compositions = list.map((entry: Record<string, unknown>, i: number) => {
    const match = /^\s*([0-9.]+)\s*wt%/.exec(String(entry.label));
    if (!match) throw new DataFileError(file, `coefficients_by_composition[${i}].label must start with "<number> wt%", received ${JSON.stringify(entry.label)}`);
    return { weightPercent: Number(match[1]), n: dispersionFromRecord(rec.formula, entry, file, `coefficients_by_composition[${i}]`) };
  });
  compositions.sort((a, b) => a.weightPercent - b.weightPercent);
  let upper = compositions.findIndex((c) => c.weightPercent >= weightPercent);
  if (upper <= 0) upper = 1;
  const lo = compositions[upper - 1];
  const hi = compositions[upper];
  const t = (weightPercent - lo.weightPercent) / (hi.weightPercent - lo.weightPercent);
  const n =
    t === 0 ? lo.n : t === 1 ? hi.n : (wavelengthNm: number): number => (1 - t) * lo.n(wavelengthNm) + t * hi.n(wavelengthNm);
  return makeMaterial(
    {
      name: `glycerol-water:${weightPercent}`,
      description: `water with ${weightPercent} wt% glycerol, room temperature (interpolated between ${lo.weightPercent} and ${hi.weightPercent} wt%)`,
      source: citationFromRecord(rec, 'Gupta et al. 2022'),
      validRangeNm: validRangeFromRecord(rec, file),
      n,
    },
    options,
  );
}
