// Scores of a map against a field scene's truth (bench/field-scenes.js; the scenes are INVENTED).
// Targets are issue 13's: outside the film at most 1 % of pixels get a thickness and no thin
// region lies outside the film; the reported thin fraction within 0.02 of the truth; inside the
// film gross errors (> 50 nm) ≤ 1 %, p95 ≤ 15 nm, coverage ≥ 95 %; not-a-film photos: no film
// found or a film area under 1 %; bursting series: rupture frame exact; uniform coating: median
// error ≤ 5 nm with an expected range and with an anchor, the anchor pixel within 5 nm.
// Pixels whose truth is shared (`scene.edge`: blended film edges, a glint's faint rim) are left
// out on both sides. Pure functions of (scene, result): the tests can reuse them.
// Issue 14 (uneven light, picture styles; bench/light-scenes.js): the same in-film targets, no
// false thin region (a thin region where the truth is not thin), and the fitted exposure field
// (`result.exposureField`, null when none was fitted = flat) against the true gain of the scene
// (`scene.unevenLight.gain`, null = evenly lit): both normalised to their median over the film.
// On evenly lit scenes the fitted field must stay flat within ±2 %.
import { relativeGainAt } from '../dist/map/lightEvenness.js';
import { PixelStatus } from '../dist/map/types.js';

export const TARGETS = {
  outsideMeasuredMax: 0.01,
  thinFractionErrorMax: 0.02,
  grossMax: 0.01,
  p95MaxNm: 15,
  coverageMin: 0.95,
  notFilmAreaMax: 0.01,
  coatingMedianMaxNm: 5,
  anchorErrorMaxNm: 5,
  fieldFlatMax: 0.02,
  /** A thin region's pixel counts as truly thin up to this much above the threshold (the p95 target). */
  thinToleranceNm: 15,
};

/**
 * @typedef {{ film: Uint8Array, edge: Uint8Array, truthNm: Float32Array, thinBelowNm: number | null, width: number, height: number,
 *   unevenLight?: { gain: Float32Array } | null }} ScoredScene
 * @typedef {{ status: Uint8Array, thicknessNm: Float32Array, darkLimitNm: number, thinLabels?: Int32Array,
 *   stats: { thin_fraction: number | null, film_area_px?: number }, filmArea?: { found: boolean, areaPx: number },
 *   exposureField?: { logGainCoefficients: readonly number[] } | null }} ScoredMap
 */

/** Non-film pixels (edge band left out) and how many of them got a thickness (status ok). */
export function outsideFilmScore(/** @type {ScoredScene} */ scene, /** @type {ScoredMap} */ result) {
  let outside = 0;
  let measured = 0;
  for (let p = 0; p < scene.film.length; p++) {
    if (scene.film[p] || scene.edge[p]) continue;
    outside++;
    if (result.status[p] === PixelStatus.ok) measured++;
  }
  const fraction = outside === 0 ? 0 : measured / outside;
  return { outsidePx: outside, measuredPx: measured, fraction, pass: fraction <= TARGETS.outsideMeasuredMax };
}

/**
 * Thin regions of the map whose pixels lie mostly outside the true film (edge band left out).
 * Needs the map's per-pixel region labels (`thinLabels`); without them the result says so.
 */
export function thinRegionsOutsideFilm(/** @type {ScoredScene} */ scene, /** @type {ScoredMap} */ result) {
  const labels = result.thinLabels;
  if (!labels) return { regions: null, outside: null, pass: false, note: 'the map carries no thin-region labels' };
  /** @type {Map<number, { inFilm: number, outFilm: number }>} */
  const counts = new Map();
  for (let p = 0; p < labels.length; p++) {
    const id = labels[p];
    if (id === 0) continue;
    let c = counts.get(id);
    if (!c) counts.set(id, (c = { inFilm: 0, outFilm: 0 }));
    if (scene.edge[p]) continue;
    if (scene.film[p]) c.inFilm++;
    else c.outFilm++;
  }
  let outside = 0;
  for (const c of counts.values()) if (c.outFilm > c.inFilm) outside++;
  return { regions: counts.size, outside, pass: outside === 0, note: '' };
}

/** True thin fraction (film pixels below the threshold / film pixels) against the map's. Null without a threshold. */
export function thinFractionScore(/** @type {ScoredScene} */ scene, /** @type {ScoredMap} */ result) {
  if (scene.thinBelowNm === null) return null;
  let film = 0;
  let thin = 0;
  for (let p = 0; p < scene.film.length; p++) {
    if (!scene.film[p]) continue;
    film++;
    if (scene.truthNm[p] < scene.thinBelowNm) thin++;
  }
  const truth = film === 0 ? 0 : thin / film;
  const reported = result.stats.thin_fraction;
  const error = reported === null ? Number.NaN : Math.abs(reported - truth);
  return { truth, reported, error, pass: error <= TARGETS.thinFractionErrorMax };
}

/**
 * Errors inside the true film (edge band left out), as bench/accuracy.js scores clean scenes:
 * gross = estimates more than 50 nm off / estimates; coverage = (estimates + dark pixels whose
 * truth is at most the dark limit + 10 nm) / film pixels thinner than 1,500 nm.
 */
export function insideFilmScore(/** @type {ScoredScene} */ scene, /** @type {ScoredMap} */ result) {
  /** @type {number[]} */
  const errors = [];
  let eligible = 0;
  let covered = 0;
  let gross = 0;
  for (let p = 0; p < scene.film.length; p++) {
    if (!scene.film[p] || scene.edge[p]) continue;
    const t = scene.truthNm[p];
    const s = result.status[p];
    if (t < 1500) eligible++;
    if (s === PixelStatus.dark) {
      if (t < 1500 && t <= result.darkLimitNm + 10) covered++;
      continue;
    }
    if (s !== PixelStatus.ok) continue;
    if (t < 1500) covered++;
    const e = Math.abs(result.thicknessNm[p] - t);
    errors.push(e);
    if (e > 50) gross++;
  }
  errors.sort((a, b) => a - b);
  const q = (/** @type {number} */ f) => (errors.length ? errors[Math.min(errors.length - 1, Math.floor(f * errors.length))] : Number.NaN);
  const out = {
    medianNm: q(0.5),
    p95Nm: q(0.95),
    gross: errors.length ? gross / errors.length : Number.NaN,
    coverage: eligible ? covered / eligible : Number.NaN,
    estimates: errors.length,
  };
  return { ...out, pass: out.gross <= TARGETS.grossMax && out.p95Nm <= TARGETS.p95MaxNm && out.coverage >= TARGETS.coverageMin };
}

/** Film area of a map as a share of the photo: filmArea.areaPx, else stats.film_area_px, else every pixel. */
export function filmAreaFraction(/** @type {ScoredMap} */ result) {
  const total = result.status.length;
  const area = result.filmArea ? result.filmArea.areaPx : (result.stats.film_area_px ?? total);
  return area / total;
}

/** A photo that holds no film: passes when the map finds no film, or a film area under 1 %. */
export function notAFilmScore(/** @type {ScoredMap} */ result) {
  const found = result.filmArea ? result.filmArea.found : true;
  const areaFraction = filmAreaFraction(result);
  return { found, areaFraction, pass: !found || areaFraction < TARGETS.notFilmAreaMax };
}

/** First frame whose map found no film (`filmArea.found === false`), or null. */
export function ruptureFrame(/** @type {Pick<ScoredMap, 'filmArea'>[]} */ results) {
  for (let i = 0; i < results.length; i++) if (results[i].filmArea?.found === false) return i;
  return null;
}

/** Median absolute error over the film's estimates (edge band left out), for the uniform coating. */
export function medianErrorNm(/** @type {ScoredScene} */ scene, /** @type {ScoredMap} */ result) {
  return insideFilmScore(scene, result).medianNm;
}

/** The map's thickness at an anchor pixel against the anchor's given thickness. */
export function anchorScore(/** @type {ScoredScene} */ scene, /** @type {ScoredMap} */ result, /** @type {{ x: number, y: number, thicknessNm: number }} */ anchor) {
  const got = result.thicknessNm[anchor.y * scene.width + anchor.x];
  const error = Math.abs(got - anchor.thicknessNm);
  return { givenNm: anchor.thicknessNm, mappedNm: got, error, pass: error <= TARGETS.anchorErrorMaxNm };
}

/**
 * Every single-photo target that applies to a film scene, as rows { target, value, pass }.
 * @param {ScoredScene} scene @param {ScoredMap} result
 */
export function filmSceneTargets(scene, result) {
  const rows = [];
  const outside = outsideFilmScore(scene, result);
  rows.push({ target: 'outside film with a thickness ≤ 1 %', value: `${(100 * outside.fraction).toFixed(2)} % of ${outside.outsidePx} px`, pass: outside.pass });
  const regions = thinRegionsOutsideFilm(scene, result);
  rows.push({
    target: 'no thin region outside the film',
    value: regions.regions === null ? regions.note : `${regions.outside} of ${regions.regions} regions outside`,
    pass: regions.pass,
  });
  const thin = thinFractionScore(scene, result);
  if (thin) {
    rows.push({
      target: 'thin fraction within 0.02',
      value: `reported ${thin.reported === null ? 'none' : thin.reported.toFixed(3)}, truth ${thin.truth.toFixed(3)}`,
      pass: thin.pass,
    });
  }
  const inside = insideFilmScore(scene, result);
  rows.push({ target: 'in film gross ≤ 1 %', value: `${(100 * inside.gross).toFixed(2)} %`, pass: inside.gross <= TARGETS.grossMax });
  rows.push({ target: 'in film p95 ≤ 15 nm', value: `${inside.p95Nm.toFixed(2)} nm (median ${inside.medianNm.toFixed(2)} nm)`, pass: inside.p95Nm <= TARGETS.p95MaxNm });
  rows.push({ target: 'in film coverage ≥ 95 %', value: `${(100 * inside.coverage).toFixed(2)} %`, pass: inside.coverage >= TARGETS.coverageMin });
  return rows;
}

/** Median of the values of `values` (copied and sorted). */
function medianOf(/** @type {Float64Array} */ values) {
  if (values.length === 0) return Number.NaN;
  const sorted = Float64Array.from(values).sort();
  return sorted[Math.floor(sorted.length / 2)];
}

/**
 * The fitted exposure field against flat and against the scene's true gain, over the film (edge
 * band left out), each normalised to its median there:
 *   flatDeviation = max |g_fit − 1| (0 when no field was fitted);
 *   truthError    = max |g_fit / g_true − 1| (null when no field was fitted);
 *   flatTruthError = max |1 / g_true − 1|, what a flat field (one exposure) is off by;
 * g_true = 1 everywhere when the scene is evenly lit (`unevenLight` null or absent).
 * @param {ScoredScene} scene @param {ScoredMap} result
 */
export function exposureFieldScore(scene, result) {
  const field = result.exposureField ?? null;
  const truthGain = scene.unevenLight ? scene.unevenLight.gain : null;
  let n = 0;
  for (let p = 0; p < scene.film.length; p++) if (scene.film[p] && !scene.edge[p]) n++;
  const fitted = new Float64Array(n);
  const truth = new Float64Array(n);
  for (let p = 0, k = 0; p < scene.film.length; p++) {
    if (!scene.film[p] || scene.edge[p]) continue;
    fitted[k] = field ? relativeGainAt(field.logGainCoefficients, scene.width, scene.height, p % scene.width, Math.floor(p / scene.width)) : 1;
    truth[k] = truthGain ? truthGain[p] : 1;
    k++;
  }
  const fittedMedian = medianOf(fitted);
  const truthMedian = medianOf(truth);
  let flatDeviation = 0;
  let truthError = 0;
  let flatTruthError = 0;
  for (let k = 0; k < n; k++) {
    const f = fitted[k] / fittedMedian;
    const t = truth[k] / truthMedian;
    flatDeviation = Math.max(flatDeviation, Math.abs(f - 1));
    truthError = Math.max(truthError, Math.abs(f / t - 1));
    flatTruthError = Math.max(flatTruthError, Math.abs(1 / t - 1));
  }
  return {
    fitted: field !== null,
    pixels: n,
    flatDeviation: field ? flatDeviation : 0,
    flatPass: !field || flatDeviation <= TARGETS.fieldFlatMax,
    truthError: field ? truthError : null,
    flatTruthError,
  };
}

/** The row "fitted field flat within ±2 %" for an evenly lit scene. */
export function fieldFlatRow(/** @type {ScoredScene} */ scene, /** @type {ScoredMap} */ result) {
  const f = exposureFieldScore(scene, result);
  return {
    target: 'fitted field flat within ±2 %',
    value: f.fitted ? `max |gain − 1| ${(100 * f.flatDeviation).toFixed(2)} % over the film` : 'n/a (no field fitted)',
    pass: f.flatPass,
  };
}

/**
 * Thin regions of the map that are false: fewer than half of their pixels (edge band left out)
 * are film whose truth is thin (below the threshold plus `TARGETS.thinToleranceNm`). Without a
 * threshold every thin region is false. Needs the map's per-pixel region labels.
 */
export function falseThinRegions(/** @type {ScoredScene} */ scene, /** @type {ScoredMap} */ result) {
  const labels = result.thinLabels;
  if (!labels) return { regions: null, falseRegions: null, pass: false, note: 'the map carries no thin-region labels' };
  const limit = scene.thinBelowNm === null ? -Infinity : scene.thinBelowNm + TARGETS.thinToleranceNm;
  /** @type {Map<number, { thin: number, notThin: number }>} */
  const counts = new Map();
  for (let p = 0; p < labels.length; p++) {
    const id = labels[p];
    if (id === 0) continue;
    let c = counts.get(id);
    if (!c) counts.set(id, (c = { thin: 0, notThin: 0 }));
    if (scene.edge[p]) continue;
    if (scene.film[p] && scene.truthNm[p] < limit) c.thin++;
    else c.notThin++;
  }
  let falseRegions = 0;
  for (const c of counts.values()) if (c.thin < c.notThin || c.thin === 0) falseRegions++;
  return { regions: counts.size, falseRegions, pass: falseRegions === 0, note: '' };
}

/**
 * The targets of issue 14 on a light scene, as rows { target, value, pass } (pass null: reported,
 * not a target): in-film gross ≤ 1 %, p95 ≤ 15 nm, coverage ≥ 95 %; no false thin region; outside
 * the film at most 1 % of pixels with a thickness; the fitted field against the true light.
 * @param {ScoredScene} scene @param {ScoredMap} result
 */
export function lightSceneTargets(scene, result) {
  /** @type {{ target: string, value: string, pass: boolean | null }[]} */
  const rows = [];
  const inside = insideFilmScore(scene, result);
  const none = inside.estimates === 0 ? `no estimate in the film${result.filmArea && !result.filmArea.found ? ' (the map found no film)' : ''}` : null;
  rows.push({ target: 'in film gross ≤ 1 %', value: none ?? `${(100 * inside.gross).toFixed(2)} %`, pass: inside.gross <= TARGETS.grossMax });
  rows.push({ target: 'in film p95 ≤ 15 nm', value: none ?? `${inside.p95Nm.toFixed(2)} nm (median ${inside.medianNm.toFixed(2)} nm)`, pass: inside.p95Nm <= TARGETS.p95MaxNm });
  rows.push({ target: 'in film coverage ≥ 95 %', value: `${(100 * inside.coverage).toFixed(2)} %`, pass: inside.coverage >= TARGETS.coverageMin });
  const thin = falseThinRegions(scene, result);
  rows.push({
    target: 'no false thin region',
    value: thin.regions === null ? thin.note : `${thin.falseRegions} false of ${thin.regions} thin regions`,
    pass: thin.pass,
  });
  const outside = outsideFilmScore(scene, result);
  rows.push({
    target: 'outside film with a thickness ≤ 1 %',
    value: outside.outsidePx === 0 ? 'n/a (film edge to edge)' : `${(100 * outside.fraction).toFixed(2)} % of ${outside.outsidePx} px`,
    pass: outside.pass,
  });
  const f = exposureFieldScore(scene, result);
  const flatOff = `a flat field is off by ${(100 * f.flatTruthError).toFixed(1)} %`;
  rows.push({
    target: 'fitted field vs the true light (max relative error over the film)',
    value: f.fitted ? `${(100 * /** @type {number} */ (f.truthError)).toFixed(1)} % (${flatOff})` : `n/a (no field fitted; ${flatOff})`,
    pass: null,
  });
  return rows;
}
