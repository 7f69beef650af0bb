/**
 * Hands a finished series to the HTML report (`src/report`, `SeriesReportInput`): rows become
 * frame rows, drainage fits become fit summaries with sampled curves, threshold crossings carry
 * their interval and extrapolation flag, and the rupture becomes the charts' marker. After a
 * rupture the fitted curves end at the first frame without film. Pure apart from reading
 * optional preview thumbnails.
 */
import { readFile, stat } from 'node:fs/promises';
import { join } from 'node:path';
import type { DrainageFitSummary, SeriesFlowView, SeriesFrameRow, SeriesReportInput, SeriesRupture } from '../report/types.js';
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

/** Where `lamella series --flow` (and `lamella flow OUT --out OUT/flow`) writes the flow; the report shows it from there. */
export const SERIES_FLOW_DIR = 'flow';

/**
 * The flow view from OUT/flow/flow.json (format `lamella-flow`), with the overlay of each pair
 * whose first frame is a frame of the series; null when there is none or it cannot be read.
 */
async function readFlowView(outDir: string, frameNames: ReadonlySet<string>, withOverlays: boolean): Promise<{ view: SeriesFlowView; overlays: Map<string, Buffer> } | null> {
  let json: Record<string, unknown>;
  try {
    json = JSON.parse(await readFile(join(outDir, SERIES_FLOW_DIR, 'flow.json'), 'utf8')) as Record<string, unknown>;
  } catch {
    return null;
  }
  if (json.format !== 'lamella-flow' || !Array.isArray(json.pairs)) return null;
  const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  const settings = (json.settings ?? {}) as Record<string, unknown>;
  const pairs: SeriesFlowView['pairs'] = [];
  const overlays = new Map<string, Buffer>();
  for (const p of json.pairs as Array<Record<string, unknown>>) {
    if (typeof p.frame !== 'string' || !frameNames.has(p.frame) || num(p.time_s) === null || num(p.dt_s) === null) continue;
    const s = (p.summary ?? {}) as Record<string, unknown>;
    pairs.push({
      frame: p.frame, nextFrame: String(p.next_frame), timeS: num(p.time_s)!, dtS: num(p.dt_s)!,
      meanSpeed: num(s.mean_speed_per_s), p95Speed: num(s.p95_speed_per_s), meanUp: num(s.mean_up_per_s), coverage: num(s.coverage) ?? 0,
    });
    if (withOverlays && typeof p.stem === 'string' && !/[\/]/.test(p.stem)) {
      const path = join(outDir, SERIES_FLOW_DIR, `${p.stem}.flow.png`);
      try {
        if ((await stat(path)).size <= MAX_THUMB_BYTES * 2) overlays.set(p.frame, await readFile(path));
      } catch {
        // No overlay (written with --no-overlays): the slider keeps the thumbnail.
      }
    }
  }
  return { view: { unit: settings.unit === 'µm/s' ? 'µm/s' : 'px/s', pairs, patches: num(json.patches) ?? 0 }, overlays };
}

export async function seriesReportInput(
  summary: SeriesSummary,
  rows: readonly SeriesRow[],
  options: { title: string; generatedAt: string; outDir: string; stems: Map<string, string> },
): Promise<SeriesReportInput> {
  const withThumbs = rows.length <= MAX_THUMB_FRAMES;
  const flow = await readFlowView(options.outDir, new Set(rows.map((r) => r.frame)), withThumbs);
  const frames: SeriesFrameRow[] = [];
  for (const r of rows) {
    const mapPng = withThumbs ? await thumbnail(options.outDir, r.frame, options.stems) : undefined;
    const flowPng = flow?.overlays.get(r.frame);
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
      ...(flowPng ? { flowPng } : {}),
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
    ...(flow ? { flow: flow.view } : {}),
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
