/**
 * Photo → thickness map, on decoded pixels (no file I/O): the core of `lamella map`.
 *
 * 1. Fit exposure, white balance and flare from the photo (fitPhotoFormation), unless fixed.
 * 2. Predict the encoded colour of every table thickness; read the dark and wash-out limits.
 * 3. On a grid of cells (pixels, or blocks of a large photo, denoised by averaging), list each
 *    cell's candidate thicknesses through the colour cube, and resolve interference orders over
 *    the whole image (resolveOrders).
 * 4. At full resolution, match every pixel again and keep the candidate that continues the
 *    resolved field; refine it continuously between table samples; set its status and
 *    confidence (colour residual × margin to the next-best order).
 * 5. Statistics, histogram and thin regions.
 */
import { createCandidateCube } from './candidateCube.js';
import { type CandidateField, createCandidateField } from './candidateField.js';
import { type ColourTable, predictEncodedTable, thicknessAt } from './colourTable.js';
import { emptyExclusions } from './filmArea.js';
import { markGreyExplained, predictGreyCurve } from './neutralGrey.js';
import { priorFilmCells } from './priorFilmArea.js';
import { fitQualityOf, poorFitWarning } from './fitQuality.js';
import { lightEvennessOf, unevenLightWarning, UNEVEN_LIGHT_RATIO } from './lightEvenness.js';
import { denseFringeWarning } from './denseFringes.js';
import { estimateNoise } from './estimateNoise.js';
import { distinctColourCount, fitPhotoFormation, type PhotoFormationFit } from './fitPhotoFormation.js';
import { matchSpace, toMatchSpace } from './matchSpace.js';
import { createMatchScratch, matchColour } from './matchColour.js';
import { createColourMemo, matchPixelRows, pixelPassInput, releaseColourMemo, scorePixelRows } from './pixelPass.js';
import { keepConsistentPixels } from './keepConsistent.js';
import { CellClass, CellVerdict, type FilmAreaCells, findFilmArea } from './filmArea.js';
import { sampleFitPixels } from './fitSamples.js';
import { brightnessOf, type TableLimits } from './tableLimits.js';
import type { CandidateCube } from './candidateCube.js';
import type { MatchSpace } from './matchSpace.js';
import type { MatchScratch } from './matchColour.js';
import { matchPixelsThreaded, scorePixelsThreaded, sharedFloat32, sharedUint8 } from './pixelThreads.js';
import { resolveOrders } from './resolveOrders.js';
import { okValuesOnStride, percentileSelect } from './statistics.js';
import { summariseMap } from './summariseMap.js';
import { tableLimits } from './tableLimits.js';
import { type CameraResponse, describeResponse, isStrongResponse } from '../colour/toneResponse.js';
import { type Anchor, type MapPhase, type ExposureParameters, type FilmAreaMode, type FilmAreaSummary, type MapResult, PixelStatus } from './types.js';
import { firstCodeAtLeast, type PhotoPixels, sharedPixels, valueAt } from './photoPixels.js';

export interface MapPixelsInput {
  readonly rgb: PhotoPixels;
  readonly width: number;
  readonly height: number;
  /** 1 = film pixel to measure. */
  readonly film: Uint8Array;
  readonly table: ColourTable;
  /** Thickness of one interference order at mid-visible (λ/(2n cosθ)), nm. */
  readonly orderPeriodNm: number;
  readonly thinBelowNm: number | null;
  readonly pixelSizeUm?: number | null;
  readonly anchors?: readonly Anchor[];
  readonly prior?: Float32Array | null;
  /** Previous frame's pixel statuses (a series): its film area is a prior of this frame's. */
  readonly priorStatus?: Uint8Array | null;
  readonly exposureFixed?: ExposureParameters | null;
  readonly fitWhiteBalance?: boolean;
  readonly initialWhiteBalance?: readonly [number, number, number];
  /**
   * Threads for the per-pixel pass (the calling thread plus helpers; default 1). Used for photos
   * of at least MIN_THREADED_PIXELS; the map is the same whatever the count.
   */
  readonly threads?: number;
  /** Told when each stage of the map starts (a display of progress; see MapOptions.onPhase). */
  readonly onPhase?: ((phase: MapPhase) => void) | null;
  /** Start of the photo-formation fit instead of its scan (a series: the previous frame's fit). */
  readonly fitStart?: ExposureParameters | null;
  /**
   * A photo-formation fit made already on a subsampled preview of this photo (./lightField.ts): taken
   * as this map's fit, with no fit of its own (a fit uses a fixed number of samples, which the
   * preview holds as well). Ignored with `exposureFixed`.
   */
  readonly adoptedFit?: { readonly fit: PhotoFormationFit; readonly parameters: ExposureParameters } | null;
  /**
   * Most cells of the order-resolution grid (default MAX_GRID_CELLS); a photo with more pixels is
   * resolved on blocks of pixels. A light-field preview uses fewer (mapPhoto.ts).
   */
  readonly maxGridCells?: number;
  /** Fit as a series frame (MapOptions.ownFit): the photo's own answer first, `fitStart` only competing. */
  readonly ownFit?: boolean;
  /** Second look at poor colour matches (keepConsistent.ts); default true. */
  readonly keepConsistent?: boolean;
  /** The photo holds 8-bit values (k/255): lets the pixel pass remember work per exact colour. */
  readonly eightBit?: boolean;
  /** Weight of chroma in colour matching (< 1 for chroma-subsampled JPEGs; see matchSpace.ts). */
  readonly chromaWeight?: number;
  /** `auto`: find the film area (filmArea.ts); `whole` (default): every `film` pixel is film. */
  readonly filmArea?: FilmAreaMode;
  /** Thickness range the film is known to lie in (nm), from `--expect`. */
  readonly expectNm?: readonly [number, number] | null;
}

export interface MapPixelsResult extends MapResult {
  readonly fit: PhotoFormationFit | null;
  readonly noiseSigma: number;
  readonly washoutNm: number;
  /** Why pixels have no estimate: no resolved order nearby, no continuous candidate, poor colour match. */
  readonly ambiguousReasons: { unresolved: number; discontinuous: number; poorMatch: number };
  /** Poor colour matches kept because they agree with their well-matched neighbours (keepConsistent.ts). */
  readonly keptByNeighbours: number;
  /** Wall time of each stage, ms. */
  readonly timingsMs: Record<string, number>;
  /** Per-pixel thin-region id (0 = none), for the flags image. */
  readonly thinLabels: Int32Array;
}

const PER_CELL = 6;
const CUBE_LEVELS = 32;
const MAX_GRID_CELLS = 300_000;
const SATURATED = 0.996;
const MIN_FIT_SAMPLES = 64;
/**
 * The photo-formation fit is made again on the film alone when the film area leaves out more than
 * this share of the photo (a background, a chuck, a bench); below it the first fit stands.
 */
const REFIT_EXCLUDED_SHARE = 0.1;
/** Fewer distinct colours than this: the photo-formation fit is reported as poorly determined. */
const MIN_DISTINCT_COLOURS = 12;
/**
 * Fewer distinct colours than this (distinctColourCount): the camera's response is not fitted
 * (identity, or a series' previous frame's). A judgement, see DEVELOPERS.md: a tone curve and a
 * saturation need dark, mid and bright colours of several hues beside exposure, white balance and
 * flare. Measured on invented scenes: a draining soap film or a wafer with a bowl and steps holds
 * 57–68; a film whose gradient spans 140 nm holds 36, and there the contrast traded with the
 * flare enough to split a black-film disc into false thin regions; so 48.
 */
export const MIN_RESPONSE_COLOURS = 48;
/** Pixels sampled (on a regular stride) for the photo-formation fit. */
const FIT_SAMPLES = 2000;
/** Smaller photos are mapped on one thread (starting helpers would cost more than it saves). */
export const MIN_THREADED_PIXELS = 1_000_000;

export function mapPixels(input: MapPixelsInput): MapPixelsResult {
  const { rgb, width, height, film } = input;
  const pixels = width * height;
  const warnings: string[] = [];
  // --expect: the film lies in this range; orders and the fit see only those thicknesses.
  const table = input.expectNm ? restrictTable(input.table, input.expectNm) : input.table;
  const anchors = (input.anchors ?? []).filter((a: Anchor) => {
    const inside = a.thicknessNm >= table.startNm && a.thicknessNm <= thicknessAt(table, table.count - 1);
    if (!inside) warnings.push(`--anchor ${a.x},${a.y}=${a.thicknessNm} lies outside the thicknesses considered (${round1(table.startNm)}–${round1(thicknessAt(table, table.count - 1))} nm): it is ignored`);
    return inside;
  });
  // With helper threads, the arrays they read or write live in SharedArrayBuffers.
  const threads = Math.max(1, Math.floor(input.threads ?? 1));
  const threaded = threads > 1 && pixels >= MIN_THREADED_PIXELS;
  const status = threaded ? sharedUint8(pixels) : new Uint8Array(pixels);
  // (mapPixels itself holds no loop: see markExcludedAndSaturated.)
  const saturatedCount = markExcludedAndSaturated(film, rgb, status, pixels);
  const noise = estimateNoise(rgb, width, height, film);
  const space = matchSpace(input.chromaWeight ?? 1);
  const noiseSigma = noise.sigma;

  const timingsMs: Record<string, number> = {};
  let clock = performance.now();
  const lap = (name: string): void => {
    const now = performance.now();
    timingsMs[name] = Math.round(now - clock);
    clock = now;
  };
  lap('prepare');
  const phase = input.onPhase ?? ((): void => undefined);
  phase('fit');
  const autoArea = input.filmArea !== 'whole';
  const asserted = anchors.length > 0 || (input.expectNm ?? null) !== null;
  const maxGridCells = input.maxGridCells ?? MAX_GRID_CELLS;
  const blockOf = Math.max(1, Math.ceil(Math.sqrt(pixels / maxGridCells)));
  const anchorCellsOf = anchors
    .filter((a) => a.x >= 0 && a.y >= 0 && a.x < width && a.y < height)
    .map((a) => Math.floor(a.y / blockOf) * Math.ceil(width / blockOf) + Math.floor(a.x / blockOf));
  // 1. Photo-formation parameters, from film pixels (colour-balanced samples, see fitSamples.ts).
  let fit: PhotoFormationFit | null = null;
  let fitSampleCount = 0;
  const fitOnFilm = (start: ExposureParameters | null, balanced: boolean): ExposureParameters => {
    const plain = sampleFitPixels(rgb, status, pixels, FIT_SAMPLES, balanced);
    const distinct = distinctColourCount(balanced ? sampleFitPixels(rgb, status, pixels, FIT_SAMPLES, false) : plain);
    // Anchors take part in the fit: their pixels are samples of known thickness.
    const anchored = anchorSamples(rgb, status, width, height, anchors, table, plain.length / 3, distinct);
    const samplesRgb = anchored ? concatFloat32(plain, anchored.colours) : plain;
    const fixedIndex = anchored ? new Int32Array(samplesRgb.length / 3).fill(-1) : null;
    if (anchored && fixedIndex) fixedIndex.set(anchored.index, plain.length / 3);
    const samples = space ? toMatchSpace(space, samplesRgb, new Float32Array(samplesRgb.length)) : samplesRgb;
    fitSampleCount = samples.length / 3;
    if (samples.length < 3 * MIN_FIT_SAMPLES) {
      fit = null;
      return { exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] };
    }
    fit = fitPhotoFormation({
      table,
      samples,
      fitWhiteBalance: input.fitWhiteBalance ?? true,
      fitFlare: true,
      noiseSigma,
      initialWhiteBalance: input.initialWhiteBalance,
      space,
      samplesRgb,
      fixedIndex,
      start,
      // A series frame fits on its own (fitPhotoFormation.ts) when its photo can tell the
      // parameters: with fewer than MIN_DISTINCT_COLOURS (e.g. black film over most of the film)
      // it cannot, and the previous frame's parameters are followed, as the order prior decides
      // where the colours cannot.
      ownFit: input.ownFit === true && distinct >= MIN_DISTINCT_COLOURS,
      fitResponse: responseFitted(table, distinct),
    });
    // A response held from the start (not fitted here) is the start's; none held is the identity.
    return { ...fit.parameters, responseSource: responseSourceOf(table, distinct, fit.parameters.response ? start : null) };
  };
  // Before the film area is known, a colour-balanced sample keeps a large uniform background
  // from outvoting the film; once it is known, the film's own pixels are sampled plainly.
  const adopted = input.exposureFixed ? null : input.adoptedFit ?? null;
  if (adopted) {
    fit = adopted.fit;
    fitSampleCount = adopted.fit.samplesUsed;
  }
  let parameters: ExposureParameters = input.exposureFixed ?? adopted?.parameters ?? fitOnFilm(input.fitStart ?? null, autoArea);

  lap('fit');
  phase('orders');
  const periodIndex = input.orderPeriodNm / table.stepNm;
  const count = table.count;
  const block = blockOf;
  const gridWidth = Math.ceil(width / block);
  const gridHeight = Math.ceil(height / block);
  const cube = createCandidateCube(CUBE_LEVELS, PER_CELL);
  const scratch = createMatchScratch(PER_CELL);
  const maxJump = (block === 1 ? 0.3 : 0.4) * periodIndex;
  // 2–3. Predicted colours, limits, and every cell's candidates (again after a refit).
  let cells = matchCells(rgb, status, width, height, block, gridWidth, gridHeight, table, parameters, noiseSigma, periodIndex, space, cube, scratch);
  let area: FilmAreaCells | null = null;
  const priorFilm = autoArea && input.priorStatus ? priorFilmCells(input.priorStatus, width, height, block, gridWidth, gridHeight) : null;
  if (autoArea) {
    area = filmAreaOf(cells, gridWidth, gridHeight, block, noiseSigma, periodIndex, maxJump, table.rgbLinear, asserted, anchorCellsOf, predictGreyCurve(table, parameters, space), priorFilm);
    const excluded = applyFilmArea(area, status, width, height, block, gridWidth, false);
    // What was fitted included pixels that are not film: fit again on the film alone (a plain
    // sample) and class the cells again.
    if (!input.exposureFixed && !adopted && area.found && excluded > REFIT_EXCLUDED_SHARE * pixels) {
      resetDerivedStatus(status, rgb);
      applyFilmArea(area, status, width, height, block, gridWidth, false);
      // Without anchors from the scan (or the series' start) again: the first fit may sit in a
      // minimum the background pulled it into. With anchors from the first fit, whose order the
      // anchors pinned.
      parameters = fitOnFilm(anchors.length > 0 ? parameters : input.fitStart ?? null, false);
      resetDerivedStatus(status, rgb);
      cells = matchCells(rgb, status, width, height, block, gridWidth, gridHeight, table, parameters, noiseSigma, periodIndex, space, createCandidateCube(CUBE_LEVELS, PER_CELL), scratch);
      area = filmAreaOf(cells, gridWidth, gridHeight, block, noiseSigma, periodIndex, maxJump, table.rgbLinear, asserted, anchorCellsOf, predictGreyCurve(table, parameters, space), priorFilm);
    }
    applyFilmArea(area, status, width, height, block, gridWidth, true);
    dropCellsOutsideFilm(area, cells, gridWidth * gridHeight);
  }
  if (!input.exposureFixed) {
    const currentFit = fit as PhotoFormationFit | null;
    if (currentFit === null) {
      warnings.push(
        `only ${fitSampleCount} usable film pixels: too few to fit exposure, white balance and flare; assumed exposure 1, no flare (give --calibration for real numbers)`,
      );
    } else {
      const distinct = distinctColourCount(sampleFitPixels(rgb, status, pixels, FIT_SAMPLES, false));
      if (distinct < MIN_DISTINCT_COLOURS && (area === null || area.found)) {
        warnings.push(
          `the photo holds only ${distinct} distinct colour(s): exposure, white balance and flare are poorly determined from it and rest on weak assumptions; map it with --calibration, --known, --anchor or --expect for trustworthy numbers`,
        );
      }
      warnings.push(...currentFit.warnings);
      warnings.push(...responseWarnings(table, parameters, distinct));
    }
  }
  const { predictedRgb, predicted, limits, cellDark, field } = cells;

  lap('orders');
  // 3. Order resolution on the cell grid.
  const noiseCost = 3 * noiseSigma * noiseSigma;
  const order = resolveOrders(field, {
    maxJump,
    noiseCost: noiseCost / (block === 1 ? 9 : block * block),
    boundaryWeight: 40 * noiseCost,
    prior: input.prior ? priorOnGrid(input.prior, width, height, block, gridWidth, gridHeight, table) : null,
    priorWeight: 4 * noiseCost,
    dark: cellDark,
    darkPosition: limits.darkLimitIndex,
    anchors: anchors.map((a) => anchorCell(a, width, height, block, gridWidth, table)),
  });

  fillUnresolved(order.position, field, cellDark, gridWidth, gridHeight, limits.darkLimitIndex, maxJump);

  lap('orders');
  phase('pixels');
  // 4. Full resolution.
  const thicknessNm = (threaded ? sharedFloat32(pixels) : new Float32Array(pixels)).fill(NaN);
  const confidence = threaded ? sharedFloat32(pixels) : new Float32Array(pixels);
  const common = {
    rgb: threaded ? sharedPixels(rgb) : rgb,
    width,
    height,
    status,
    gridPosition: order.position,
    block,
    gridWidth,
    gridHeight,
    predictedRgb,
    count,
    space,
    pixelJump: 0.3 * periodIndex,
    washoutIndex: limits.washoutIndex,
    startNm: table.startNm,
    stepNm: table.stepNm,
  };
  // The memo keys colours by their 8-bit levels: 16-bit codes are matched afresh, pixel by pixel.
  const remember = input.eightBit === true && !(input.rgb.codes instanceof Uint16Array);
  const pass = pixelPassInput(common, space ? createCandidateCube(CUBE_LEVELS, PER_CELL) : cells.cube, remember ? createColourMemo(count) : null);
  const passOut = { thicknessNm, cost: confidence, alternativeCost: threaded ? sharedFloat32(pixels) : new Float32Array(pixels) };
  const matchRows = (y0: number, y1: number) => matchPixelRows(pass, passOut, scratch, y0, y1);
  const dropped = threaded
    ? matchPixelsThreaded({ ...common, cubeLevels: CUBE_LEVELS, perCell: PER_CELL, eightBit: remember }, passOut, threads, matchRows)
    : matchRows(0, height);
  releaseColourMemo(pass.memo);
  // The empirical scale of the colour residual: JPEG smooths the pixel-to-pixel noise the noise
  // profile sees, while its chroma errors and the model's own error remain.
  const medianCost = medianOfOk(confidence, status);
  // Allowance for model error (dispersion data, camera model) on top of the noise.
  const modelSlack = 3 * (2 / 255) ** 2;
  const score = { rgb: common.rgb, width, status, noise, medianCost, modelSlack };
  const scoreRows = (y0: number, y1: number) => scorePixelRows(score, passOut, y0, y1);
  const poor = threaded ? scorePixelsThreaded(score, passOut, height, threads, scoreRows) : scoreRows(0, height);
  // Poor colour matches that agree with the smooth field of their well-matched neighbours stay.
  const keptByNeighbours =
    poor > 0
      ? keepConsistentPixels({ width, height, status, thicknessNm, confidence, orderPeriodNm: input.orderPeriodNm, keep: input.keepConsistent !== false })
      : 0;
  const reasons = { unresolved: dropped.unresolved, discontinuous: dropped.discontinuous, poorMatch: poor - keptByNeighbours };

  lap('pixels');
  phase('summaries');
  const filmArea = summariseFilmArea(autoArea ? 'auto' : 'whole', area, status, width, height, block, gridWidth, input.pixelSizeUm ?? null);
  if (area && !filmArea.found) {
    warnings.push(
      'no film found: no part of the photo shows colours this film gives under the fitted light in a continuous field (a background, a card or a scene that is not a thin film?); nothing was measured. Check --stack and --light, or give --region / --mask around the film, or --film-area whole to measure every pixel',
    );
  } else if (filmArea.excludedPx.undecided > 0) {
    warnings.push(
      `${filmArea.excludedPx.undecided} dark pixels at the photo border could be black film or dark background: they are counted neither as film nor as thin. If the photo shows only film, give --film-area whole; otherwise give --region or --mask around the film`,
    );
  }
  const fitQuality = fitQualityOf({
    rgb,
    status,
    thicknessNm,
    predictedRgb,
    startNm: table.startNm,
    stepNm: table.stepNm,
    filmAreaPx: filmArea.areaPx,
    unmatchedPx: reasons.poorMatch,
    encoded: table.encoding === 'srgb',
  });
  if (fitQuality && fitQuality.verdict === 'poor' && filmArea.found) warnings.push(poorFitWarning(fitQuality));
  const lightEvenness = filmArea.found
    ? lightEvennessOf({ rgb, status, thicknessNm, predictedRgb, startNm: table.startNm, stepNm: table.stepNm, width, height, encoded: table.encoding === 'srgb', response: parameters.response })
    : null;
  if (lightEvenness && lightEvenness.gainMax / lightEvenness.gainMin > UNEVEN_LIGHT_RATIO) warnings.push(unevenLightWarning(lightEvenness));
  // Fringes denser than the photo resolves (steep film at a frame, a bead's edge): said in plain words.
  const denseFringes = filmArea.found ? denseFringeWarning(thicknessNm, width, height, input.orderPeriodNm) : null;
  if (denseFringes) warnings.push(denseFringes);
  if (input.expectNm && filmArea.found && reasons.poorMatch + filmArea.excludedPx.not_film_colour > 0.01 * pixels) {
    warnings.push(
      `${reasons.poorMatch + filmArea.excludedPx.not_film_colour} pixels match no thickness within --expect ${input.expectNm[0]}-${input.expectNm[1]} nm: they get no estimate (not film, or film outside the range; check the range)`,
    );
  }
  checkAnchors(anchors, thicknessNm, status, width, warnings, 0.05 * input.orderPeriodNm);
  // 5. Summaries.
  const { thinRegions, thinLabels, stats, histogram } = summariseMap(thicknessNm, status, width, height, input.thinBelowNm, input.pixelSizeUm ?? null);
  if (saturatedCount > 0) warnings.push(`${saturatedCount} pixels are clipped (saturated) and have no estimate`);
  const washoutNm = thicknessAt(table, Math.min(limits.washoutIndex, count - 1));
  return {
    width,
    height,
    thicknessNm,
    confidence,
    status,
    fitted: { ...parameters, residualDeltaE: undefined },
    stats,
    histogram,
    thinRegions,
    darkLimitNm: thicknessAt(table, limits.darkLimitIndex),
    warnings,
    fit,
    noiseSigma,
    washoutNm,
    ambiguousReasons: reasons,
    keptByNeighbours,
    timingsMs: (lap('summaries'), timingsMs),
    thinLabels,
    filmArea,
    fitQuality,
    lightEvenness,
  };
}

/**
 * Pixels outside the film mask become excluded, clipped ones saturated; returns how many were
 * clipped. Loops such as this one live in small functions of their own, not in mapPixels: a loop
 * makes V8 compile its function on the fly (on-stack replacement), and compiled code entered that
 * way was compiled again for every photo of a series, for all of mapPixels (50–80 ms each time).
 */
function markExcludedAndSaturated(film: Uint8Array, rgb: PhotoPixels, status: Uint8Array, pixels: number): number {
  let saturatedCount = 0;
  const { codes, values } = rgb;
  // On codes, a channel is clipped from this code up (the same test as on its value).
  const clippedCode = firstCodeAtLeast(rgb.levels, SATURATED);
  for (let i = 0; i < pixels; i++) {
    if (!film[i]) status[i] = PixelStatus.excluded;
    else {
      const k = i * 3;
      const clipped = codes !== null
        ? codes[k] >= clippedCode || codes[k + 1] >= clippedCode || codes[k + 2] >= clippedCode
        : values[k] >= SATURATED || values[k + 1] >= SATURATED || values[k + 2] >= SATURATED;
      if (clipped) {
        status[i] = PixelStatus.saturated;
        saturatedCount++;
      }
    }
  }
  return saturatedCount;
}

/** Cells the film area leaves out lose their candidates and their dark mark. */
function dropCellsOutsideFilm(area: FilmAreaCells, cells: CellMatches, cellCount: number): void {
  for (let c = 0; c < cellCount; c++) {
    if (area.verdict[c] !== CellVerdict.film) {
      cells.usable[c] = 0;
      cells.cellDark[c] = 0;
      cells.field.count[c] = 0;
    }
  }
}

/**
 * Mean colour of each cell over its measurable pixels. With block = 1 a 3×3 neighbourhood is
 * averaged instead (denoising, and JPEG's half-resolution chroma). Returns usable flags.
 */
function averageCells(
  rgb: PhotoPixels,
  status: Uint8Array,
  width: number,
  height: number,
  block: number,
  gridWidth: number,
  gridHeight: number,
  out: Float32Array,
  dark: Uint8Array,
  state: Uint8Array,
): Uint8Array {
  const usable = new Uint8Array(gridWidth * gridHeight);
  const radius = block === 1 ? 1 : 0;
  // (The photo's arrays in locals: one predictable branch per pixel, see ./photoPixels.ts.)
  const { codes, values, levels } = rgb;
  for (let gy = 0; gy < gridHeight; gy++) {
    for (let gx = 0; gx < gridWidth; gx++) {
      const c = gy * gridWidth + gx;
      const x0 = Math.max(0, gx * block - radius);
      const y0 = Math.max(0, gy * block - radius);
      const x1 = Math.min(width, (gx + 1) * block + radius);
      const y1 = Math.min(height, (gy + 1) * block + radius);
      let r = 0;
      let g = 0;
      let b = 0;
      let n = 0;
      let darkCount = 0;
      let saturatedCount = 0;
      let glareCount = 0;
      let total = 0;
      for (let y = y0; y < y1; y++) {
        for (let x = x0; x < x1; x++) {
          const i = y * width + x;
          const s = status[i];
          if (s === PixelStatus.excluded) continue;
          total++;
          if (s === PixelStatus.dark) darkCount++;
          else if (s === PixelStatus.saturated) {
            saturatedCount++;
            if (isGlare(rgb, i)) glareCount++;
          }
          if (s !== PixelStatus.ok) continue;
          const k = i * 3;
          if (codes !== null) {
            r += levels[codes[k]];
            g += levels[codes[k + 1]];
            b += levels[codes[k + 2]];
          } else {
            r += values[k];
            g += values[k + 1];
            b += values[k + 2];
          }
          n++;
        }
      }
      if (block === 1) {
        const centre = gy * width + gx;
        const s = status[centre];
        if (s !== PixelStatus.ok) {
          if (s === PixelStatus.dark) dark[c] = 1;
          state[c] = s === PixelStatus.dark ? 1 : s === PixelStatus.saturated && isGlare(rgb, centre) ? 2 : s === PixelStatus.excluded ? 3 : 4;
          continue;
        }
      } else if (total === 0) {
        state[c] = 3;
        continue;
      } else if (darkCount * 2 > total) {
        dark[c] = 1;
        state[c] = 1;
      } else if (saturatedCount * 2 > total) {
        // Clipped mostly in one channel: a vivid film colour beyond the encoding (a picture
        // style's saturation boost), not a glint; its cell is a colour no thickness gives here.
        state[c] = glareCount * 2 >= saturatedCount ? 2 : 4;
      }
      if (n === 0 || n * 2 < total) {
        if (state[c] === 0) state[c] = 4;
        continue;
      }
      out[c * 3] = r / n;
      out[c * 3 + 1] = g / n;
      out[c * 3 + 2] = b / n;
      usable[c] = 1;
    }
  }
  return usable;
}

function priorOnGrid(
  prior: Float32Array,
  width: number,
  height: number,
  block: number,
  gridWidth: number,
  gridHeight: number,
  table: ColourTable,
): Float32Array {
  const out = new Float32Array(gridWidth * gridHeight);
  const counts = new Uint32Array(gridWidth * gridHeight);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const v = prior[y * width + x];
      if (v !== v) continue;
      const c = Math.floor(y / block) * gridWidth + Math.floor(x / block);
      out[c] += (v - table.startNm) / table.stepNm;
      counts[c]++;
    }
  }
  for (let c = 0; c < out.length; c++) out[c] = counts[c] > 0 ? out[c] / counts[c] : NaN;
  return out;
}

function anchorCell(
  anchor: Anchor,
  width: number,
  height: number,
  block: number,
  gridWidth: number,
  table: ColourTable,
): { cell: number; position: number } {
  if (!(anchor.x >= 0 && anchor.x < width && anchor.y >= 0 && anchor.y < height)) {
    throw new RangeError(`--anchor ${anchor.x},${anchor.y} lies outside the ${width}×${height} photo`);
  }
  return {
    cell: Math.floor(anchor.y / block) * gridWidth + Math.floor(anchor.x / block),
    position: (anchor.thicknessNm - table.startNm) / table.stepNm,
  };
}

/**
 * Too-dark pixels: encoded brightness (brightest channel), averaged over the 3×3 neighbourhood
 * of film pixels (so that noise does not speckle the black film), below the dark limit's.
 */
function markDarkPixels(rgb: PhotoPixels, status: Uint8Array, width: number, height: number, darkLuma: number): void {
  if (height === 0) return;
  // Running 3×3 box sums of brightness and of the count of non-excluded pixels, from three
  // horizontal row sums kept in a ring (no full-size temporaries). The loops are functions of
  // their own, each row's arrays passed in (V8 compiles them once, not inside this one per photo).
  const rowBrightness = [new Float64Array(width), new Float64Array(width), new Float64Array(width)];
  const rowWeight = [new Float64Array(width), new Float64Array(width), new Float64Array(width)];
  const brightness = new Float64Array(width);
  const weight = new Float64Array(width);
  sumDarkRow(rgb, status, width, 0, rowBrightness[0], rowWeight[0], brightness, weight);
  for (let y = 0; y < height; y++) {
    if (y + 1 < height) sumDarkRow(rgb, status, width, y + 1, rowBrightness[(y + 1) % 3], rowWeight[(y + 1) % 3], brightness, weight);
    const here = y % 3;
    const above = (y + 2) % 3;
    const below = (y + 1) % 3;
    markDarkRow(status, y * width, width, darkLuma, rowBrightness[here], rowWeight[here], y > 0 ? rowBrightness[above] : null, y > 0 ? rowWeight[above] : null, y + 1 < height ? rowBrightness[below] : null, y + 1 < height ? rowWeight[below] : null);
  }
}

/** Row y's horizontal 3-sums of brightness (brightest channel) and of the count of non-excluded pixels. */
function sumDarkRow(rgb: PhotoPixels, status: Uint8Array, width: number, y: number, outB: Float64Array, outW: Float64Array, brightness: Float64Array, weight: Float64Array): void {
  const row = y * width;
  const { codes, values, levels } = rgb;
  for (let x = 0; x < width; x++) {
    const i = row + x;
    if (status[i] === PixelStatus.excluded) {
      brightness[x] = 0;
      weight[x] = 0;
    } else {
      const k = i * 3;
      if (codes !== null) {
        // The levels rise with the code: the brightest channel's value is the brightest code's.
        const r = codes[k];
        const g = codes[k + 1];
        const b = codes[k + 2];
        brightness[x] = levels[r > g ? (r > b ? r : b) : g > b ? g : b];
      } else {
        const r = values[k];
        const g = values[k + 1];
        const b = values[k + 2];
        brightness[x] = r > g ? (r > b ? r : b) : g > b ? g : b;
      }
      weight[x] = 1;
    }
  }
  for (let x = 0; x < width; x++) {
    let l = brightness[x];
    let w = weight[x];
    if (x > 0) {
      l += brightness[x - 1];
      w += weight[x - 1];
    }
    if (x + 1 < width) {
      l += brightness[x + 1];
      w += weight[x + 1];
    }
    outB[x] = l;
    outW[x] = w;
  }
}

/** Marks the row's film pixels whose 3×3 mean brightness is below the limit (rows above and below: null at the photo's edge). */
function markDarkRow(
  status: Uint8Array,
  row: number,
  width: number,
  darkLuma: number,
  hereB: Float64Array,
  hereW: Float64Array,
  aboveB: Float64Array | null,
  aboveW: Float64Array | null,
  belowB: Float64Array | null,
  belowW: Float64Array | null,
): void {
  for (let x = 0; x < width; x++) {
    const i = row + x;
    if (status[i] !== PixelStatus.ok) continue;
    let l = hereB[x];
    let w = hereW[x];
    if (aboveB !== null) {
      l += aboveB[x];
      w += aboveW![x];
    }
    if (belowB !== null) {
      l += belowB[x];
      w += belowW![x];
    }
    if (l < darkLuma * w) status[i] = PixelStatus.dark;
  }
}

/**
 * Cells that growth could not reach (isolated between dark cells, or cut off by conflicts)
 * take the candidate nearest to a resolved or dark neighbour, in a few sweeps.
 */
function fillUnresolved(
  position: Float32Array,
  field: ReturnType<typeof createCandidateField>,
  dark: Uint8Array,
  gridWidth: number,
  gridHeight: number,
  darkPosition: number,
  maxJump: number,
): void {
  const { perCell, count } = field;
  for (let sweep = 0; sweep < 3; sweep++) {
    let changed = 0;
    for (let y = 0; y < gridHeight; y++) {
      for (let x = 0; x < gridWidth; x++) {
        const c = y * gridWidth + x;
        if (count[c] === 0 || position[c] === position[c]) continue;
        let sum = 0;
        let n = 0;
        for (let dy = -1; dy <= 1; dy++) {
          const ny = y + dy;
          if (ny < 0 || ny >= gridHeight) continue;
          for (let dx = -1; dx <= 1; dx++) {
            const nx = x + dx;
            if (nx < 0 || nx >= gridWidth || (dx === 0 && dy === 0)) continue;
            const j = ny * gridWidth + nx;
            const v = position[j];
            if (v === v) {
              sum += v;
              n++;
            } else if (dark[j]) {
              sum += darkPosition;
              n++;
            }
          }
        }
        if (n === 0) continue;
        const reference = sum / n;
        let best = NaN;
        let bestGap = maxJump;
        for (let k = 0; k < count[c]; k++) {
          const p = field.position[c * perCell + k];
          const gap = Math.abs(p - reference);
          if (gap <= bestGap) {
            bestGap = gap;
            best = p;
          }
        }
        if (best === best) {
          position[c] = best;
          changed++;
        }
      }
    }
    if (changed === 0) break;
  }
}

/** Median of the values at ok pixels (on a stride of about 200k samples). */
function medianOfOk(values: Float32Array, status: Uint8Array): number {
  const sample = okValuesOnStride(values, status, 200_000);
  return sample.length === 0 ? 0 : percentileSelect(sample, 50);
}

/**
 * Fit samples at user anchors: the measurable pixels within 2 px of each anchor, repeated so
 * that each anchor weighs like 3 % of the regular samples (at least 40), or like all of them in a
 * photo of few colours. Null when none.
 */
function anchorSamples(
  rgb: PhotoPixels,
  status: Uint8Array,
  width: number,
  height: number,
  anchors: readonly Anchor[],
  table: ColourTable,
  regular: number,
  distinctColours: number,
): { colours: Float32Array; index: Int32Array } | null {
  const colours: number[] = [];
  const index: number[] = [];
  for (const anchor of anchors) {
    const position = Math.round((anchor.thicknessNm - table.startNm) / table.stepNm);
    if (position < 0 || position >= table.count) continue;
    const pixels: number[] = [];
    for (let dy = -2; dy <= 2; dy++) {
      for (let dx = -2; dx <= 2; dx++) {
        const x = anchor.x + dx;
        const y = anchor.y + dy;
        if (x < 0 || y < 0 || x >= width || y >= height) continue;
        const i = y * width + x;
        if (status[i] === PixelStatus.ok) pixels.push(i);
      }
    }
    if (pixels.length === 0) continue;
    // A photo of few colours cannot fix its exposure by itself: there the anchors weigh as much
    // as all the other samples together, so they decide the order the fit settles in.
    const wanted = distinctColours < MIN_DISTINCT_COLOURS ? Math.max(40, regular) : Math.max(40, Math.ceil(0.03 * regular));
    for (let k = 0; k < wanted; k++) {
      const i = pixels[k % pixels.length];
      colours.push(valueAt(rgb, i * 3), valueAt(rgb, i * 3 + 1), valueAt(rgb, i * 3 + 2));
      index.push(position);
    }
  }
  return index.length === 0 ? null : { colours: Float32Array.from(colours), index: Int32Array.from(index) };
}

function concatFloat32(a: Float32Array, b: Float32Array): Float32Array {
  const out = new Float32Array(a.length + b.length);
  out.set(a);
  out.set(b, a.length);
  return out;
}

interface CellMatches {
  readonly predictedRgb: Float32Array;
  /** The predicted table in the matching space (predictedRgb itself when there is none). */
  readonly predicted: Float32Array;
  readonly limits: TableLimits;
  readonly cellColour: Float32Array;
  /** Cell means in encoded RGB (cellColour is in the matching space). */
  readonly cellColourRgb: Float32Array;
  readonly cellDark: Uint8Array;
  readonly cellState: Uint8Array;
  readonly usable: Uint8Array;
  readonly field: CandidateField;
  readonly cube: CandidateCube;
}

/** Cell states written by averageCells. */
const CellState = { usable: 0, dark: 1, saturated: 2, excluded: 3, mixed: 4 } as const;

/**
 * Predicted colours and limits for these parameters, the too-dark pixels, and every cell's mean
 * colour and candidate thicknesses.
 */
function matchCells(
  rgb: PhotoPixels,
  status: Uint8Array,
  width: number,
  height: number,
  block: number,
  gridWidth: number,
  gridHeight: number,
  table: ColourTable,
  parameters: ExposureParameters,
  noiseSigma: number,
  periodIndex: number,
  space: MatchSpace | null,
  cube: CandidateCube,
  scratch: MatchScratch,
): CellMatches {
  const predictedRgb = predictEncodedTable(table, parameters);
  const count = table.count;
  const limits = tableLimits(predictedRgb, table.rgbLinear, count, noiseSigma, Math.round(periodIndex));
  const predicted = space ? toMatchSpace(space, predictedRgb, new Float32Array(predictedRgb.length)) : predictedRgb;
  markDarkPixels(rgb, status, width, height, limits.darkLuma);
  const cellColour = new Float32Array(gridWidth * gridHeight * 3);
  const cellDark = new Uint8Array(gridWidth * gridHeight);
  const cellState = new Uint8Array(gridWidth * gridHeight);
  const usable = averageCells(rgb, status, width, height, block, gridWidth, gridHeight, cellColour, cellDark, cellState);
  const cellColourRgb = space ? cellColour.slice() : cellColour;
  // Averaging commutes with the (affine) matching space: transform the cell means.
  if (space) toMatchSpace(space, cellColour, cellColour);
  const field = createCandidateField(gridWidth, gridHeight, PER_CELL);
  for (let c = 0; c < gridWidth * gridHeight; c++) {
    if (!usable[c]) continue;
    const n = matchColour(cube, predicted, count, cellColour[c * 3], cellColour[c * 3 + 1], cellColour[c * 3 + 2], scratch);
    field.count[c] = n;
    for (let k = 0; k < n; k++) {
      field.position[c * PER_CELL + k] = scratch.position[k];
      field.cost[c * PER_CELL + k] = scratch.cost[k];
    }
  }
  return { predictedRgb, predicted, limits, cellColour, cellColourRgb, cellDark, cellState, usable, field, cube };
}

/**
 * Allowance on a cell's best colour cost for "some thickness gives this colour": the noise of a
 * cell mean, JPEG's own error and the model's (dispersion data, camera model), in the squared
 * distance of the matching space. Measured on the field scenes (bench/field-scenes.js): film
 * cells of clean JPEG photos lie below 3·(4/255)², neutral and saturated non-film colours above.
 */
function explainedCost(noiseSigma: number, block: number): number {
  const perCell = block === 1 ? 9 : block * block;
  return 3 * (9 * (noiseSigma * noiseSigma) / perCell + (5 / 255) ** 2);
}

function filmAreaOf(
  cells: CellMatches,
  gridWidth: number,
  gridHeight: number,
  block: number,
  noiseSigma: number,
  periodIndex: number,
  maxJump: number,
  rgbLinear: Float64Array,
  filmAsserted: boolean,
  anchorCells: readonly number[],
  /** Predicted neutral greys in the matching space (neutralGrey.ts). */
  greyCurve: Float32Array,
  /** The previous frame's film area on the grid (a series), or null. */
  priorFilm: Uint8Array | null,
): FilmAreaCells {
  const { cellState, field, predictedRgb, limits } = cells;
  const n = gridWidth * gridHeight;
  const cellClass = new Uint8Array(n);
  // A film that looks black when thin (its reflectance vanishes): its first-order greys are
  // "darkish" like a dark background. Below this table position, a colour match cannot tell.
  const vanishing = rgbLinear[0] + rgbLinear[1] + rgbLinear[2] < 0.03;
  let darkishPosition = -1;
  if (vanishing) {
    let peak = 0;
    const firstOrder = Math.min(predictedRgb.length / 3, Math.round(1.2 * periodIndex));
    for (let i = 0; i < firstOrder; i++) peak = Math.max(peak, brightnessOf(predictedRgb[i * 3], predictedRgb[i * 3 + 1], predictedRgb[i * 3 + 2]));
    darkishPosition = 0;
    while (darkishPosition < firstOrder && brightnessOf(predictedRgb[darkishPosition * 3], predictedRgb[darkishPosition * 3 + 1], predictedRgb[darkishPosition * 3 + 2]) < 0.4 * peak) darkishPosition++;
    darkishPosition = Math.max(darkishPosition, limits.darkLimitIndex);
  }
  const allowance = explainedCost(noiseSigma, block);
  const cellBrightness = new Float32Array(n);
  for (let c = 0; c < n; c++) cellBrightness[c] = brightnessOf(cells.cellColourRgb[c * 3], cells.cellColourRgb[c * 3 + 1], cells.cellColourRgb[c * 3 + 2]);
  const cellChroma = new Float32Array(n);
  for (let c = 0; c < n; c++) {
    if (field.count[c] === 0) continue;
    const i = Math.max(0, Math.min(predictedRgb.length / 3 - 1, Math.round(field.position[c * PER_CELL])));
    const r = predictedRgb[i * 3];
    const g = predictedRgb[i * 3 + 1];
    const b = predictedRgb[i * 3 + 2];
    cellChroma[c] = Math.max(r, g, b) - Math.min(r, g, b);
  }
  for (let c = 0; c < n; c++) {
    const state = cellState[c];
    if (state === CellState.excluded) cellClass[c] = CellClass.excluded;
    else if (state === CellState.saturated) cellClass[c] = CellClass.saturated;
    else if (state === CellState.dark) cellClass[c] = vanishing ? CellClass.darkish : CellClass.unexplained;
    else if (state === CellState.mixed || field.count[c] === 0) cellClass[c] = CellClass.unexplained;
    else if (field.cost[c * PER_CELL] > allowance) cellClass[c] = CellClass.unexplained;
    else if (field.position[c * PER_CELL] < darkishPosition) cellClass[c] = CellClass.darkish;
    else cellClass[c] = CellClass.filmColour;
  }
  return findFilmArea({
    gridWidth,
    gridHeight,
    cellClass,
    candidatePosition: field.position,
    candidateCount: field.count,
    perCell: PER_CELL,
    maxJump,
    thinPosition: periodIndex,
    openingRadius: block === 1 ? 3 : 2,
    cellChroma,
    filmAsserted,
    cellBrightness,
    anchorCells,
    // Only film-colour cells can join the film's seeds, so only they are compared with the greys.
    greyExplained: markGreyExplained(cells.cellColour, filmColourCells(cellClass), greyCurve, allowance, new Uint8Array(n)),
    priorFilm,
  });
}

function filmColourCells(cellClass: Uint8Array): Uint8Array {
  const out = new Uint8Array(cellClass.length);
  for (let c = 0; c < cellClass.length; c++) out[c] = cellClass[c] === CellClass.filmColour ? 1 : 0;
  return out;
}

const VERDICT_STATUS: Record<number, number> = {
  [CellVerdict.notFilmColour]: PixelStatus.notFilm,
  [CellVerdict.darkSurroundings]: PixelStatus.notFilm,
  [CellVerdict.glint]: PixelStatus.notFilm,
  [CellVerdict.isolated]: PixelStatus.notFilm,
  [CellVerdict.undecided]: PixelStatus.undecided,
};

/**
 * Marks the pixels of cells that are not film (notFilm / undecided); `final` also records the
 * reason per pixel in `reasonOut`. Returns how many pixels it marked.
 */
function applyFilmArea(
  area: FilmAreaCells,
  status: Uint8Array,
  width: number,
  height: number,
  block: number,
  gridWidth: number,
  _final: boolean,
): number {
  let marked = 0;
  for (let y = 0; y < height; y++) {
    const gy = Math.floor(y / block);
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const s = status[i];
      if (s === PixelStatus.excluded) continue;
      const v = area.verdict[gy * gridWidth + Math.floor(x / block)];
      if (v === CellVerdict.film || v === CellVerdict.excluded) continue;
      status[i] = area.found ? VERDICT_STATUS[v] : PixelStatus.notFilm;
      marked++;
    }
  }
  return marked;
}

/**
 * A clipped pixel that looks like glare (a lamp's reflection, a glint): at least two channels at
 * the clipping level. One clipped channel with the others well below is a vivid colour the
 * encoding could not hold, on film as much as anywhere.
 */
function isGlare(rgb: PhotoPixels, i: number): boolean {
  return (valueAt(rgb, i * 3) >= SATURATED ? 1 : 0) + (valueAt(rgb, i * 3 + 1) >= SATURATED ? 1 : 0) + (valueAt(rgb, i * 3 + 2) >= SATURATED ? 1 : 0) >= 2;
}

/** Undoes what the film area and the dark test wrote (before they are decided again). */
function resetDerivedStatus(status: Uint8Array, rgb: PhotoPixels): void {
  for (let i = 0; i < status.length; i++) {
    const s = status[i];
    if (s === PixelStatus.dark || s === PixelStatus.notFilm || s === PixelStatus.undecided) {
      status[i] = valueAt(rgb, i * 3) >= SATURATED || valueAt(rgb, i * 3 + 1) >= SATURATED || valueAt(rgb, i * 3 + 2) >= SATURATED ? PixelStatus.saturated : PixelStatus.ok;
    }
  }
}

/** Film-area summary with the excluded pixels by reason (from the cell verdicts). */
function summariseFilmArea(
  mode: FilmAreaMode,
  area: FilmAreaCells | null,
  status: Uint8Array,
  width: number,
  height: number,
  block: number,
  gridWidth: number,
  pixelSizeUm: number | null,
): FilmAreaSummary {
  const excludedPx = emptyExclusions();
  let areaPx = 0;
  for (let y = 0; y < height; y++) {
    const gy = Math.floor(y / block);
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const s = status[i];
      if (s === PixelStatus.excluded) {
        excludedPx.outside_region++;
        continue;
      }
      if (s !== PixelStatus.notFilm && s !== PixelStatus.undecided) {
        areaPx++;
        continue;
      }
      const v = area ? area.verdict[gy * gridWidth + Math.floor(x / block)] : CellVerdict.notFilmColour;
      if (s === PixelStatus.undecided) excludedPx.undecided++;
      else if (v === CellVerdict.darkSurroundings) excludedPx.dark_surroundings++;
      else if (v === CellVerdict.glint) excludedPx.glint++;
      else if (v === CellVerdict.isolated) excludedPx.isolated++;
      else excludedPx.not_film_colour++;
    }
  }
  const pixels = width * height;
  return {
    mode,
    areaPx,
    fraction: pixels > 0 ? areaPx / pixels : 0,
    areaUm2: pixelSizeUm === null ? null : areaPx * pixelSizeUm * pixelSizeUm,
    found: areaPx > 0,
    excludedPx,
  };
}

/** The part of the table within [min, max] nm (a view: no copy of the colours). */
function restrictTable(table: ColourTable, [minNm, maxNm]: readonly [number, number]): ColourTable {
  const first = Math.max(0, Math.floor((minNm - table.startNm) / table.stepNm));
  const last = Math.min(table.count - 1, Math.ceil((maxNm - table.startNm) / table.stepNm));
  if (last - first < 2) throw new RangeError(`--expect ${minNm}-${maxNm} leaves fewer than three thicknesses of the colour table (${table.startNm}–${thicknessAt(table, table.count - 1)} nm in steps of ${table.stepNm} nm)`);
  return {
    ...table,
    startNm: thicknessAt(table, first),
    count: last - first + 1,
    rgbLinear: table.rgbLinear.subarray(first * 3, (last + 1) * 3),
  };
}

function responseFitted(table: ColourTable, distinct: number): boolean {
  return table.encoding === 'srgb' && distinct >= MIN_RESPONSE_COLOURS;
}

function responseSourceOf(table: ColourTable, distinct: number, start: ExposureParameters | null): 'photo' | 'calibration' | 'identity' {
  if (responseFitted(table, distinct)) return 'photo';
  return start?.response ? (start.responseSource ?? 'photo') : 'identity';
}

/** Plain words on the camera's response: a strong picture style found, or none fitted for want of colours. */
function responseWarnings(table: ColourTable, parameters: ExposureParameters, distinct: number): string[] {
  if (table.encoding !== 'srgb') return [];
  if (parameters.responseSource === 'photo' && isStrongResponse(parameters.response)) {
    return [`the camera's picture style was fitted: ${describeResponse(parameters.response as CameraResponse)} (the map undoes it; a photo without a picture style, or a --calibration of this camera, is more certain)`];
  }
  // Too few colours to fit it: the JSON record says so (response.source 'identity'); no warning,
  // as most such photos (a uniform coating, a step wafer) are mapped with a calibration anyway.
  void distinct;
  return [];
}

function round1(value: number): number {
  return Math.round(value * 10) / 10;
}

/**
 * An anchor binds the map: its pixel must read its given thickness within the model's precision
 * (here 5 % of an order); otherwise a warning says so and why it may be.
 */
function checkAnchors(anchors: readonly Anchor[], thicknessNm: Float32Array, status: Uint8Array, width: number, warnings: string[], toleranceNm: number): void {
  for (const anchor of anchors) {
    const i = anchor.y * width + anchor.x;
    const value = thicknessNm[i];
    if (status[i] === PixelStatus.excluded) {
      warnings.push(`--anchor ${anchor.x},${anchor.y}=${anchor.thicknessNm} lies outside --region / --mask (or on a transparent pixel): it cannot bind the map`);
    } else if (status[i] === PixelStatus.notFilm || status[i] === PixelStatus.undecided) {
      warnings.push(`--anchor ${anchor.x},${anchor.y}=${anchor.thicknessNm} lies outside the film area found; check the position, or give --film-area whole`);
    } else if (!(value === value)) {
      warnings.push(`--anchor ${anchor.x},${anchor.y}=${anchor.thicknessNm}: that pixel got no estimate (its colour matches no thickness well); the anchor could not be checked`);
    } else if (Math.abs(value - anchor.thicknessNm) > toleranceNm) {
      warnings.push(
        `--anchor ${anchor.x},${anchor.y}=${anchor.thicknessNm}: the map reads ${round1(value)} nm there; the photo's colour at the anchor does not fit the given thickness under the fitted light (a wrong thickness, stack or --light, or a camera picture style)`,
      );
    }
  }
}
