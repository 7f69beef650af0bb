/**
 * Photo under one spectral line → thickness map, given the tabulated R(h) at the line.
 *
 * 1. Linear intensity per pixel (`lineIntensity.ts`); clipped pixels are `saturated`.
 * 2. Intensity scale: I = gain · R(h) + offset. From a calibration (exposure × mean white
 *    balance = intensity of a perfect reflector, mean flare = offset) or from the film's own
 *    brightest and darkest fringes (`fringeExtremes.ts`) matched to the table's extreme levels,
 *    as a local envelope across the frame (`intensityEnvelope.ts`) so uneven lighting is
 *    followed; the reported gain and offset are the whole-film medians. With neither, the scale
 *    is unknown and the function throws.
 * 3. Fringe order: pixels whose fringes are too dense to count are set aside as ambiguous
 *    (`unresolvedFringes.ts`); the rest is split into zones and bands on the raw normalised level
 *    (`fringeSegments.ts`), counted from anchors, a black film, the previous frame of a series
 *    (`options.prior`) or the assumed first order (`zoneBranches.ts`), and spread to band pixels
 *    (`fillPixelBranches.ts`); caps that pass an extreme are moved across it (`capCrossings.ts`).
 * 4. Thickness on the pixel's branch (`lineReflectanceTable.ts`); pixels of a free film darker
 *    than three noise levels on branch 0 are `dark` (too thin to measure; counted as thin).
 * Statistics, histogram and thin regions are the colour mode's (`src/map`), so results and
 * reports are identical in form.
 */
import { summariseMap } from '../map/summariseMap.js';
import { buildFilmMask } from '../map/filmMask.js';
import { PixelStatus, type MapOptions, type MapResult } from '../map/types.js';
import { boxMeanMasked } from './boxMean.js';
import { crossCaps } from './capCrossings.js';
import { fillPixelBranches } from './fillPixelBranches.js';
import { findFringeExtremes } from './fringeExtremes.js';
import { estimatePixelNoise } from './pixelNoise.js';
import { intensityEnvelope } from './intensityEnvelope.js';
import { denseFringesOnRange } from './unresolvedFringes.js';
import { classifyLevels, segmentFringes } from './fringeSegments.js';
import { checkLineWavelength } from './isMonochromaticLight.js';
import { lineIntensityOf, type MonoPhoto } from './lineIntensity.js';
import { EXTREME_MIN, thicknessOnBranch, type LineReflectanceTable } from './lineReflectanceTable.js';
import { anchorSeeds, blackFilmSeeds, zonePriorBranches } from './orderSeeds.js';
import { NO_BRANCH, solveZoneBranches } from './zoneBranches.js';

/** Smallest zone kept in the fringe count: 6 px (1e-4 of large films), less on tiny images. */
function minZonePx(usableCount: number): number {
  return Math.min(Math.max(6, Math.round(1e-4 * usableCount)), Math.max(1, Math.floor(usableCount / 100)));
}

/** Normalised level below / above which a pixel belongs to a dark / bright band. */
export const BAND_LEVEL = 0.12;
/** Correlation of a colour channel with the mean below which the light looks broadband. */
export const MIN_CHANNEL_CORRELATION = 0.9;

export interface LineScaleReport {
  readonly lineNm: number;
  /** Linear intensity of the brightest and darkest fringe (image or calibration). */
  readonly intensityMax: number;
  readonly intensityMin: number;
  readonly scaleFrom: 'image' | 'calibration';
  readonly ridgePixels: number;
  readonly troughPixels: number;
  /** Pixel noise (linear intensity units). */
  readonly noise: number;
  /** How the fringe count was started. */
  readonly orderFrom: 'anchor' | 'black-film' | 'series-prior' | 'assumed-first-order';
  readonly orderConflicts: number;
}

/**
 * `line`: the intensity scale and how orders were counted; `extra`: the same, snake_case, for the
 * `details` block of the map's JSON record (the colour mode fills `extra` with its own details).
 */
export type MonoMapResult = MapResult & { readonly line: LineScaleReport; readonly extra: Record<string, unknown> };

export function mapLineIntensity(
  photo: MonoPhoto & { readonly alpha?: Float32Array },
  options: MapOptions,
  table: LineReflectanceTable,
  filmMask: Uint8Array | null = null,
): MonoMapResult {
  const lineNm = checkLineWavelength(table.lineNm);
  const { width, height } = photo;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new RangeError(`photo width and height must be integers >= 1, received ${width}×${height}`);
  }
  const n = width * height;
  const warnings: string[] = [];
  const film = buildFilmMask(width, height, options.region, filmMask, photo.alpha);
  const light = lineIntensityOf(photo, film);
  const usable = new Uint8Array(n);
  let usableCount = 0;
  for (let p = 0; p < n; p++) {
    if (!film[p] || light.saturated[p]) continue;
    usable[p] = 1;
    usableCount++;
  }
  if (usableCount === 0) {
    throw new Error('no film pixels to measure: the region, mask or alpha channel excludes every pixel, or every film pixel is clipped');
  }
  if (!photo.isGrey && light.worstChannelCorrelation < MIN_CHANNEL_CORRELATION) {
    warnings.push(
      `the colour channels disagree (correlation ${light.worstChannelCorrelation.toFixed(2)} < ${MIN_CHANNEL_CORRELATION}): the light may not be monochromatic (line ${lineNm} nm assumed)`,
    );
  }
  const smoothRadius = 2;
  const smoothed = boxMeanMasked(light.intensity, width, height, usable, smoothRadius);
  const classSmooth = boxMeanMasked(light.intensity, width, height, usable, 1);
  // Dense (unresolved) fringes first, on the robust range of the film's intensities, so their
  // noise-like crests and troughs never enter the intensity scale.
  const noise = estimatePixelNoise(light.intensity, width, height, usable);
  const unresolved = denseFringesOnRange(light.intensity, classSmooth, smoothed, usable, width, height, noise);
  const countable = new Uint8Array(n);
  let unresolvedCount = 0;
  for (let p = 0; p < n; p++) {
    if (unresolved[p]) unresolvedCount++;
    else countable[p] = usable[p];
  }
  const extremes = findFringeExtremes(light.intensity, smoothed, width, height, countable, smoothRadius, noise);
  const levelSpan = table.levelMax - table.levelMin;
  let gain: number;
  let offset: number;
  const fixed = options.exposureFixed ?? null;
  if (fixed !== null) {
    const wb = fixed.whiteBalance;
    gain = (fixed.exposure * (wb[0] + wb[1] + wb[2])) / 3;
    offset = (fixed.flare[0] + fixed.flare[1] + fixed.flare[2]) / 3;
    if (!(gain > 0)) throw new RangeError(`calibration exposure × white balance must be > 0, received ${gain}`);
  } else {
    if (!extremes.found) {
      throw new Error(
        `the intensity scale is unknown: no bright and dark fringe extremes found in the film (${extremes.ridgePixels} bright, ${extremes.troughPixels} dark fringe pixels) and no calibration given; photograph a film showing at least one full fringe, or give a calibration`,
      );
    }
    gain = (extremes.intensityMax - extremes.intensityMin) / levelSpan;
    offset = extremes.intensityMin - gain * table.levelMin;
    if (!(gain > 0)) throw new Error(`the intensity scale is unknown: bright fringes are not brighter than dark ones`);
  }
  const intensityMax = gain * table.levelMax + offset;
  const intensityMin = gain * table.levelMin + offset;
  const toLevel = 1 / (intensityMax - intensityMin);
  const noiseLevel = extremes.noise * toLevel;
  // Local envelope of the fringes (uneven lighting), unless a calibration fixes the scale.
  const envelopeMin = fixed === null ? intensityEnvelope(extremes.troughIndex, light.intensity, width, height, intensityMin) : null;
  const envelopeMax = fixed === null ? intensityEnvelope(extremes.ridgeIndex, light.intensity, width, height, intensityMax) : null;
  const levelWide = new Float32Array(n);
  const levelRaw = new Float32Array(n);
  for (let p = 0; p < n; p++) {
    const lo = envelopeMin === null ? intensityMin : envelopeMin[p];
    const hi = envelopeMax === null ? intensityMax : envelopeMax[p];
    const toLevelHere = hi > lo ? 1 / (hi - lo) : toLevel;
    levelWide[p] = (smoothed[p] - lo) * toLevelHere;
    levelRaw[p] = (light.intensity[p] - lo) * toLevelHere;
  }
  const seg = segmentFringes(classifyLevels(levelRaw, countable, BAND_LEVEL), width, height, minZonePx(usableCount));
  const firstKind = table.boundaryKind[0];
  if (unresolvedCount > 0) {
    warnings.push(`${unresolvedCount} px have fringes too dense to count (thickness changes too fast for the pixel size) and are marked ambiguous`);
  }
  const prior = options.prior ?? null;
  if (prior !== null && prior.length !== n) {
    throw new RangeError(`prior must be a thickness map of ${n} pixels (${width}×${height}), received ${prior.length}`);
  }
  // Where counting starts: anchors, else the previous frame of a series, else a black film.
  let seeds = anchorSeeds(options.anchors ?? [], seg, table, width, height, countable, warnings);
  let orderFrom: LineScaleReport['orderFrom'] = 'anchor';
  const priorBranch = seeds.length === 0 && prior !== null ? zonePriorBranches(seg, prior, table) : null;
  if (seeds.length === 0 && priorBranch !== null) orderFrom = 'series-prior';
  else if (seeds.length === 0 && firstKind === EXTREME_MIN) {
    seeds = blackFilmSeeds(seg, levelWide, width, height, usableCount, noiseLevel, warnings);
    orderFrom = seeds.length > 0 ? 'black-film' : 'assumed-first-order';
  } else if (seeds.length === 0) orderFrom = 'assumed-first-order';
  const zones = solveZoneBranches(seg, firstKind, seeds, priorBranch);
  if (orderFrom === 'assumed-first-order' && seg.zoneArea.length > 0) {
    warnings.push('no anchor and no black film: fringes were counted assuming the thinnest part of the film is in the first order; give an anchor to be sure');
  }
  if (zones.guessedDirectionZones.length > 0) {
    const parts = zones.guessedDirectionZones.length;
    const largest = Math.max(...zones.guessedDirectionZones.map((z) => seg.zoneArea[z]));
    warnings.push(
      `the direction of the fringe count (thickening or thinning) is a guess in ${parts} part(s) of the film (largest fringe zone ${largest} px): the reverse count fits the intensities as well; give an anchor`,
    );
  }
  if (zones.conflicts > 0) {
    warnings.push(`fringe count ambiguous: ${zones.conflicts} inconsistent count(s) around closed paths (broken or merged fringes); those parts are marked ambiguous`);
  }
  const pixels = fillPixelBranches(seg, zones, countable, width, height);
  crossCaps(seg, zones, pixels, levelWide, width, height, firstKind, noiseLevel / (2 * smoothRadius + 1));
  const darkLevel = Math.max(0.01, 3 * noiseLevel);
  const darkLimitNm = firstKind === EXTREME_MIN ? thicknessOnBranch(table, 0, table.levelMin + darkLevel * levelSpan) : 0;
  const thicknessNm = new Float32Array(n).fill(NaN);
  const confidence = new Float32Array(n);
  const status = new Uint8Array(n);
  let tooThick = 0;
  for (let p = 0; p < n; p++) {
    if (!film[p]) status[p] = PixelStatus.excluded;
    else if (light.saturated[p]) status[p] = PixelStatus.saturated;
    else if (pixels.branch[p] === NO_BRANCH || zones.zoneAmbiguous[pixels.sourceZone[p]]) status[p] = PixelStatus.ambiguous;
    else if (pixels.branch[p] >= table.branchCount) {
      status[p] = PixelStatus.tooThick;
      tooThick++;
    }
    else if (firstKind === EXTREME_MIN && pixels.branch[p] === 0 && levelRaw[p] < darkLevel) status[p] = PixelStatus.dark;
    else {
      const reflectance = table.levelMin + levelRaw[p] * levelSpan;
      thicknessNm[p] = thicknessOnBranch(table, pixels.branch[p], reflectance);
      const u = Math.min(1, Math.max(0, levelRaw[p]));
      confidence[p] = 2 * Math.sqrt(u * (1 - u));
      status[p] = PixelStatus.ok;
    }
  }
  if (tooThick > 0) warnings.push(`${tooThick} px counted beyond the largest thickness considered (${options.maxThicknessNm} nm) are marked too thick`);
  const thinBelowNm = options.thinBelowNm ?? null;
  const { thinRegions, thinLabels, stats, histogram } = summariseMap(thicknessNm, status, width, height, thinBelowNm, options.pixelSizeUm ?? null);
  const slope = light.channelSlope;
  return {
    width,
    height,
    thicknessNm,
    confidence,
    status,
    fitted: {
      exposure: gain,
      whiteBalance: [slope[0], slope[1], slope[2]],
      flare: [0, 1, 2].map((c) => slope[c] * offset + light.channelIntercept[c]) as [number, number, number],
    },
    stats,
    histogram,
    thinRegions,
    thinLabels,
    darkLimitNm,
    warnings,
    line: {
      lineNm,
      intensityMax,
      intensityMin,
      scaleFrom: fixed !== null ? 'calibration' : 'image',
      ridgePixels: extremes.ridgePixels,
      troughPixels: extremes.troughPixels,
      noise: extremes.noise,
      orderFrom,
      orderConflicts: zones.conflicts,
    },
    extra: {
      mode: 'monochromatic',
      line_nm: lineNm,
      intensity_max: intensityMax,
      intensity_min: intensityMin,
      intensity_scale_from: fixed !== null ? 'calibration' : 'bright and dark fringes of this photo',
      bright_fringe_px: extremes.ridgePixels,
      dark_fringe_px: extremes.troughPixels,
      noise_sigma: extremes.noise,
      order_from: orderFrom,
      order_conflicts: zones.conflicts,
      unresolved_px: unresolvedCount,
    },
  };
}
