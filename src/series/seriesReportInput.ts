/**
 * Hands a finished series to the HTML report (`src/report`, `SeriesReportInput`): rows become
 * frame rows, drainage fits become fit summaries with sampled curves, threshold crossings carry
 * their interval and extrapolation flag, and the rupture becomes the charts' marker. After a
 * rupture the fitted curves end at the first frame without film. Pure apart from reading
 * optional preview thumbnails.
 */
import { readFile, stat } from 'node:fs/promises';
import { join } from 'node:path';
import type { DrainageFitSummary, SeriesFrameRow, SeriesReportInput, SeriesRupture } from '../report/types.js';
import { DRAINAGE_MODELS } from './fits/drainageModels.js';
import type { DrainageFit } from './fits/fitDrainage.js';
import { framesDir } from './frameFiles.js';
import type { SeriesRow } from './seriesRows.js';
import type { SeriesSummary } from './seriesSummary.js';
import type { RuptureRecord } from './rupture.js';

/** Thumbnails are embedded only for series up to this many frames, each under MAX_THUMB_BYTES. */
const MAX_THUMB_FRAMES = 200;
const MAX_THUMB_BYTES = 200_000;
const CURVE_POINTS = 100;

/**
 * A fit for the report. `lastTimeS`: the last frame the fit used; `untilS`: where the film was gone
 * (the first frame without film after a rupture), past which no curve is drawn.
 */
export function fitSummaryOf(fit: DrainageFit, lastTimeS: number, untilS: number | null = null): DrainageFitSummary {
  const model = DRAINAGE_MODELS.find((m) => m.name === fit.model)!;
  const p = model.parameterNames.map((name) => fit.parameters[name].value);
  const f = model.model(p);
  const endS = Math.max(lastTimeS, fit.crossing?.timeS ?? 0, 1e-9);
  const end = untilS !== null ? Math.max(untilS, 1e-9) : Math.min(endS, lastTimeS * 3 || endS);
  const curve: Array<[number, number]> = Array.from({ length: CURVE_POINTS + 1 }, (_, i) => {
    const t = (end * i) / CURVE_POINTS;
    return [t, f(t)];
  });
  return {
    model: `${fit.model} (${fit.quantity} thickness)`,
    formula: fit.formula,
    parameters: Object.fromEntries(Object.entries(fit.parameters).map(([k, v]) => [k, { value: v.value, uncertainty: v.uncertainty }])),
    rSquared: fit.rSquared,
    curve,
    crossing: fit.crossing
      ? {
          quantity: fit.quantity, timeS: fit.crossing.timeS, lowS: fit.crossing.lowS, highS: fit.crossing.highS, extrapolated: fit.crossing.extrapolated,
          ...(fit.crossing.beyondRupture ? { beyondRupture: true } : {}),
        }
      : null,
  };
}

async function thumbnail(outDir: string, frame: string, stems: Map<string, string>): Promise<Buffer | undefined> {
  const stem = stems.get(frame);
  if (stem === undefined) return undefined;
  const path = join(framesDir(outDir), `${stem}.map.png`);
  try {
    if ((await stat(path)).size > MAX_THUMB_BYTES) return undefined;
    return await readFile(path);
  } catch {
    return undefined;
  }
}

export async function seriesReportInput(
  summary: SeriesSummary,
  rows: readonly SeriesRow[],
  options: { title: string; generatedAt: string; outDir: string; stems: Map<string, string> },
): Promise<SeriesReportInput> {
  const withThumbs = rows.length <= MAX_THUMB_FRAMES;
  const frames: SeriesFrameRow[] = [];
  for (const r of rows) {
    const mapPng = withThumbs ? await thumbnail(options.outDir, r.frame, options.stems) : undefined;
    frames.push({
      frame: r.frame,
      timeS: r.timeS,
      meanNm: r.meanNm,
      medianNm: r.medianNm,
      minNm: r.minNm,
      thinFraction: r.thinFraction,
      thinRegions: r.thinRegions,
      coverage: r.coverage,
      ...(r.filmAreaPx !== undefined ? { filmAreaPx: r.filmAreaPx } : {}),
      ...(r.filmFound === false ? { filmFound: false } : {}),
      ...(mapPng ? { mapPng } : {}),
    });
  }
  const rupture = summary.rupture;
  // The fits end at the last frame with film; their curves at the first frame without.
  const fitted = rupture ? rows.filter((r) => r.timeS <= rupture.last_time_s) : rows;
  const lastTimeS = fitted.length > 0 ? fitted[fitted.length - 1].timeS : 0;
  const thin = summary.settings.thinBelowNm;
  return {
    title: options.title,
    generatedAt: options.generatedAt,
    frames,
    thinBelowNm: typeof thin === 'number' ? thin : null,
    fits: summary.drainageFits.map((fit) => fitSummaryOf(fit, lastTimeS, rupture?.first_time_s ?? null)),
    settings: summary.settings,
    calibration: summary.calibration,
    warnings: [...summary.warnings],
    rupture: rupture ? reportRupture(rupture) : null,
    observations: summary.observations,
  };
}

export function reportRupture(rupture: RuptureRecord): SeriesRupture {
  return {
    lastFrame: rupture.last_frame_with_film,
    firstFrame: rupture.first_frame_without_film,
    lastTimeS: rupture.last_time_s,
    firstTimeS: rupture.first_time_s,
    timeS: rupture.time_s,
  };
}
