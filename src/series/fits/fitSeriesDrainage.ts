/**
 * Fits every drainage law to the series' mean and minimum thickness over time. A law that cannot
 * be fitted (too few frames, no convergence) is reported as a warning instead of a fit. After a
 * rupture (../rupture.ts) the fits use only the frames up to the last frame with film, and no
 * threshold crossing is predicted later than the first frame without film.
 */
import type { SeriesRow } from '../seriesRows.js';
import type { RuptureFinding } from '../rupture.js';
import { DRAINAGE_MODELS } from './drainageModels.js';
import { fitDrainage, type DrainageFit } from './fitDrainage.js';

export interface SeriesDrainage {
  readonly fits: DrainageFit[];
  readonly warnings: string[];
}

export function fitSeriesDrainage(
  rows: readonly SeriesRow[],
  thinBelowNm: number | null,
  film?: Pick<RuptureFinding, 'rupture' | 'lastFilmIndex'> | null,
): SeriesDrainage {
  const fits: DrainageFit[] = [];
  const warnings: string[] = [];
  const used = film ? rows.slice(0, film.lastFilmIndex + 1) : rows;
  const ruptureS = film?.rupture?.first_time_s ?? null;
  for (const quantity of ['mean', 'min'] as const) {
    const points = used.filter((r) => r.filmFound !== false && (quantity === 'mean' ? r.meanNm : r.minNm) !== null);
    const tS = points.map((r) => r.timeS);
    const hNm = points.map((r) => (quantity === 'mean' ? r.meanNm : r.minNm) as number);
    for (const model of DRAINAGE_MODELS) {
      try {
        const fit = fitDrainage(tS, hNm, model, { quantity, thinBelowNm, ruptureS });
        if (!fit.converged) warnings.push(`${model.name} fit of the ${quantity} thickness did not converge in ${fit.iterations} iterations; treat it with care`);
        fits.push(fit);
      } catch (error) {
        warnings.push(`${model.name} fit of the ${quantity} thickness skipped: ${error instanceof Error ? error.message : String(error)}`);
      }
    }
  }
  return { fits, warnings };
}
