/**
 * Fits every drainage law to the series' mean and minimum thickness over time. A law that cannot
 * be fitted (too few frames, no convergence) is reported as a warning instead of a fit.
 */
import type { SeriesRow } from '../seriesRows.js';
import { DRAINAGE_MODELS } from './drainageModels.js';
import { fitDrainage, type DrainageFit } from './fitDrainage.js';

export interface SeriesDrainage {
  readonly fits: DrainageFit[];
  readonly warnings: string[];
}

export function fitSeriesDrainage(rows: readonly SeriesRow[], thinBelowNm: number | null): SeriesDrainage {
  const fits: DrainageFit[] = [];
  const warnings: string[] = [];
  for (const quantity of ['mean', 'min'] as const) {
    const points = rows.filter((r) => (quantity === 'mean' ? r.meanNm : r.minNm) !== null);
    const tS = points.map((r) => r.timeS);
    const hNm = points.map((r) => (quantity === 'mean' ? r.meanNm : r.minNm) as number);
    for (const model of DRAINAGE_MODELS) {
      try {
        const fit = fitDrainage(tS, hNm, model, { quantity, thinBelowNm });
        if (!fit.converged) warnings.push(`${model.name} fit of the ${quantity} thickness did not converge in ${fit.iterations} iterations; treat it with care`);
        fits.push(fit);
      } catch (error) {
        warnings.push(`${model.name} fit of the ${quantity} thickness skipped: ${error instanceof Error ? error.message : String(error)}`);
      }
    }
  }
  return { fits, warnings };
}
