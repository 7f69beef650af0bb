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
import { createCandidateField } from './candidateField.js';
import { type ColourTable, predictEncodedTable, thicknessAt } from './colourTable.js';
import { estimateNoise } from './estimateNoise.js';
import { distinctColourCount, fitPhotoFormation, type PhotoFormationFit } from './fitPhotoFormation.js';
import { matchSpace, toMatchSpace } from './matchSpace.js';
import { createMatchScratch, matchColour } from './matchColour.js';
import { createAlternativeMemo, matchPixelRows, scorePixelRows } from './pixelPass.js';
import { keepConsistentPixels } from './keepConsistent.js';
import { matchPixelsThreaded, scorePixelsThreaded, sharedCopy, sharedFloat32, sharedUint8 } from './pixelThreads.js';
import { resolveOrders } from './resolveOrders.js';
import { percentileSelect } from './statistics.js';
import { summariseMap } from './summariseMap.js';
import { tableLimits } from './tableLimits.js';
import { type Anchor, type ExposureParameters, type MapResult, PixelStatus } from './types.js';

export interface MapPixelsInput {
  readonly rgb: Float32Array;
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
  readonly exposureFixed?: ExposureParameters | null;
  readonly fitWhiteBalance?: boolean;
  readonly initialWhiteBalance?: readonly [number, number, number];
  /**
   * Threads for the per-pixel pass (the calling thread plus helpers; default 1). Used for photos
   * of at least MIN_THREADED_PIXELS; the map is the same whatever the count.
   */
  readonly threads?: number;
  /** Start of the photo-formation fit instead of its scan (a series: the previous frame's fit). */
  readonly fitStart?: ExposureParameters | null;
  /** Second look at poor colour matches (keepConsistent.ts); default true. */
  readonly keepConsistent?: boolean;
  /** The photo holds 8-bit values (k/255): lets the pixel pass remember work per exact colour. */
  readonly eightBit?: boolean;
  /** Weight of chroma in colour matching (< 1 for chroma-subsampled JPEGs; see matchSpace.ts). */
  readonly chromaWeight?: number;
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
/** Fewer distinct colours than this: the photo-formation fit is reported as poorly determined. */
const MIN_DISTINCT_COLOURS = 12;
/** Pixels sampled (on a regular stride) for the photo-formation fit. */
const FIT_SAMPLES = 2000;
/** Smaller photos are mapped on one thread (starting helpers would cost more than it saves). */
export const MIN_THREADED_PIXELS = 1_000_000;

export function mapPixels(input: MapPixelsInput): MapPixelsResult {
  const { rgb, width, height, film, table } = input;
  const pixels = width * height;
  const warnings: string[] = [];
  // With helper threads, the arrays they read or write live in SharedArrayBuffers.
  const threads = Math.max(1, Math.floor(input.threads ?? 1));
  const threaded = threads > 1 && pixels >= MIN_THREADED_PIXELS;
  const status = threaded ? sharedUint8(pixels) : new Uint8Array(pixels);
  let saturatedCount = 0;
  for (let i = 0; i < pixels; i++) {
    if (!film[i]) status[i] = PixelStatus.excluded;
    else if (rgb[i * 3] >= SATURATED || rgb[i * 3 + 1] >= SATURATED || rgb[i * 3 + 2] >= SATURATED) {
      status[i] = PixelStatus.saturated;
      saturatedCount++;
    }
  }
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
  // 1. Photo-formation parameters.
  let fit: PhotoFormationFit | null = null;
  let parameters: ExposureParameters;
  if (input.exposureFixed) parameters = input.exposureFixed;
  else {
    const plain = samplePixels(rgb, status, pixels, FIT_SAMPLES);
    // Anchors take part in the fit: their pixels are samples of known thickness.
    const anchored = anchorSamples(rgb, status, width, height, input.anchors ?? [], table, plain.length / 3);
    const samplesRgb = anchored ? concatFloat32(plain, anchored.colours) : plain;
    const fixedIndex = anchored ? new Int32Array(samplesRgb.length / 3).fill(-1) : null;
    if (anchored && fixedIndex) fixedIndex.set(anchored.index, plain.length / 3);
    const samples = space ? toMatchSpace(space, samplesRgb, new Float32Array(samplesRgb.length)) : samplesRgb;
    if (samples.length < 3 * MIN_FIT_SAMPLES) {
      parameters = { exposure: 1, whiteBalance: [1, 1, 1], flare: [0, 0, 0] };
      warnings.push(
        `only ${samples.length / 3} usable film pixels: too few to fit exposure, white balance and flare; assumed exposure 1, no flare (give --calibration for real numbers)`,
      );
    } else {
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
      start: input.fitStart ?? null,
    });
    const distinct = distinctColourCount(samplesRgb);
    if (distinct < MIN_DISTINCT_COLOURS) {
      warnings.push(
        `the photo holds only ${distinct} distinct colour(s): exposure, white balance and flare are poorly determined from it and rest on weak assumptions; map it with --calibration or --known for trustworthy numbers`,
      );
    }
    parameters = fit.parameters;
    warnings.push(...fit.warnings);
    }
  }

  lap('fit');
  // 2. Predicted colours and limits.
  const predictedRgb = predictEncodedTable(table, parameters);
  const count = table.count;
  const periodIndex = input.orderPeriodNm / table.stepNm;
  const limits = tableLimits(predictedRgb, table.rgbLinear, count, noiseSigma, Math.round(periodIndex));
  const predicted = space ? toMatchSpace(space, predictedRgb, new Float32Array(predictedRgb.length)) : predictedRgb;
  markDarkPixels(rgb, status, width, height, limits.darkLuma);

  lap('limits');
  // 3. Order resolution on the cell grid.
  const block = Math.max(1, Math.ceil(Math.sqrt(pixels / MAX_GRID_CELLS)));
  const gridWidth = Math.ceil(width / block);
  const gridHeight = Math.ceil(height / block);
  const cellColour = new Float32Array(gridWidth * gridHeight * 3);
  const cellDark = new Uint8Array(gridWidth * gridHeight);
  const usable = averageCells(rgb, status, width, height, block, gridWidth, gridHeight, cellColour, cellDark);
  // Averaging commutes with the (affine) matching space: transform the cell means.
  if (space) toMatchSpace(space, cellColour, cellColour);
  const cube = createCandidateCube(CUBE_LEVELS, PER_CELL);
  const scratch = createMatchScratch(PER_CELL);
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
  const noiseCost = 3 * noiseSigma * noiseSigma;
  const maxJump = (block === 1 ? 0.3 : 0.4) * periodIndex;
  const order = resolveOrders(field, {
    maxJump,
    noiseCost: noiseCost / (block === 1 ? 9 : block * block),
    boundaryWeight: 40 * noiseCost,
    prior: input.prior ? priorOnGrid(input.prior, width, height, block, gridWidth, gridHeight, table) : null,
    priorWeight: 4 * noiseCost,
    dark: cellDark,
    darkPosition: limits.darkLimitIndex,
    anchors: (input.anchors ?? []).map((a) => anchorCell(a, width, height, block, gridWidth, table)),
  });

  fillUnresolved(order.position, field, cellDark, gridWidth, gridHeight, limits.darkLimitIndex, maxJump);

  lap('orders');
  // 4. Full resolution.
  const thicknessNm = (threaded ? sharedFloat32(pixels) : new Float32Array(pixels)).fill(NaN);
  const confidence = threaded ? sharedFloat32(pixels) : new Float32Array(pixels);
  const common = {
    rgb: threaded ? sharedCopy(rgb) : rgb,
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
  const pass = { ...common, cube: space ? createCandidateCube(CUBE_LEVELS, PER_CELL) : cube, memo: input.eightBit ? createAlternativeMemo(count) : null };
  const passOut = { thicknessNm, cost: confidence, alternativeCost: threaded ? sharedFloat32(pixels) : new Float32Array(pixels) };
  const matchRows = (y0: number, y1: number) => matchPixelRows(pass, passOut, scratch, y0, y1);
  const dropped = threaded
    ? matchPixelsThreaded({ ...common, cubeLevels: CUBE_LEVELS, perCell: PER_CELL, eightBit: input.eightBit === true }, passOut, threads, matchRows)
    : matchRows(0, height);
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
  };
}

/** Up to `target` film pixels on a regular stride, as n × 3 encoded colours. */
function samplePixels(rgb: Float32Array, status: Uint8Array, pixels: number, target: number): Float32Array {
  let eligible = 0;
  for (let i = 0; i < pixels; i++) if (status[i] === PixelStatus.ok) eligible++;
  const stride = Math.max(1, Math.floor(eligible / target));
  const out = new Float32Array(Math.ceil(eligible / stride) * 3);
  let seen = 0;
  let n = 0;
  for (let i = 0; i < pixels; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    if (seen++ % stride !== 0) continue;
    out[n * 3] = rgb[i * 3];
    out[n * 3 + 1] = rgb[i * 3 + 1];
    out[n * 3 + 2] = rgb[i * 3 + 2];
    n++;
  }
  return out.subarray(0, n * 3);
}

/**
 * Mean colour of each cell over its measurable pixels. With block = 1 a 3×3 neighbourhood is
 * averaged instead (denoising, and JPEG's half-resolution chroma). Returns usable flags.
 */
function averageCells(
  rgb: Float32Array,
  status: Uint8Array,
  width: number,
  height: number,
  block: number,
  gridWidth: number,
  gridHeight: number,
  out: Float32Array,
  dark: Uint8Array,
): Uint8Array {
  const usable = new Uint8Array(gridWidth * gridHeight);
  const radius = block === 1 ? 1 : 0;
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
      let total = 0;
      for (let y = y0; y < y1; y++) {
        for (let x = x0; x < x1; x++) {
          const i = y * width + x;
          const s = status[i];
          if (s === PixelStatus.excluded) continue;
          total++;
          if (s === PixelStatus.dark) darkCount++;
          if (s !== PixelStatus.ok) continue;
          r += rgb[i * 3];
          g += rgb[i * 3 + 1];
          b += rgb[i * 3 + 2];
          n++;
        }
      }
      if (block === 1) {
        const centre = gy * width + gx;
        if (status[centre] !== PixelStatus.ok) {
          if (status[centre] === PixelStatus.dark) dark[c] = 1;
          continue;
        }
      } else if (darkCount * 2 > total && total > 0) dark[c] = 1;
      if (n === 0 || n * 2 < total) continue;
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
function markDarkPixels(rgb: Float32Array, status: Uint8Array, width: number, height: number, darkLuma: number): void {
  // Running 3×3 box sums of brightness and of the count of non-excluded pixels, from three
  // horizontal row sums kept in a ring (no full-size temporaries).
  const rowBrightness = [new Float64Array(width), new Float64Array(width), new Float64Array(width)];
  const rowWeight = [new Float64Array(width), new Float64Array(width), new Float64Array(width)];
  const brightness = new Float64Array(width);
  const weight = new Float64Array(width);
  const sumRow = (y: number, slot: number): void => {
    const outB = rowBrightness[slot];
    const outW = rowWeight[slot];
    const row = y * width;
    for (let x = 0; x < width; x++) {
      const i = row + x;
      if (status[i] === PixelStatus.excluded) {
        brightness[x] = 0;
        weight[x] = 0;
      } else {
        const r = rgb[i * 3];
        const g = rgb[i * 3 + 1];
        const b = rgb[i * 3 + 2];
        brightness[x] = r > g ? (r > b ? r : b) : g > b ? g : b;
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
  };
  if (height === 0) return;
  sumRow(0, 0);
  for (let y = 0; y < height; y++) {
    if (y + 1 < height) sumRow(y + 1, (y + 1) % 3);
    const here = y % 3;
    const above = (y + 2) % 3;
    const below = (y + 1) % 3;
    const row = y * width;
    for (let x = 0; x < width; x++) {
      const i = row + x;
      if (status[i] !== PixelStatus.ok) continue;
      let l = rowBrightness[here][x];
      let w = rowWeight[here][x];
      if (y > 0) {
        l += rowBrightness[above][x];
        w += rowWeight[above][x];
      }
      if (y + 1 < height) {
        l += rowBrightness[below][x];
        w += rowWeight[below][x];
      }
      if (l < darkLuma * w) status[i] = PixelStatus.dark;
    }
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

/** Median of the values at ok pixels (on a stride of at most ~200k samples). */
function medianOfOk(values: Float32Array, status: Uint8Array): number {
  let ok = 0;
  for (let i = 0; i < status.length; i++) if (status[i] === PixelStatus.ok) ok++;
  if (ok === 0) return 0;
  const stride = Math.max(1, Math.floor(ok / 200_000));
  const sample = new Float32Array(Math.ceil(ok / stride));
  let seen = 0;
  let n = 0;
  for (let i = 0; i < status.length; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    if (seen++ % stride === 0) sample[n++] = values[i];
  }
  return percentileSelect(sample.subarray(0, n), 50);
}

/**
 * Fit samples at user anchors: the measurable pixels within 2 px of each anchor, repeated so
 * that each anchor weighs like 3 % of the regular samples (at least 40). Null when none.
 */
function anchorSamples(
  rgb: Float32Array,
  status: Uint8Array,
  width: number,
  height: number,
  anchors: readonly Anchor[],
  table: ColourTable,
  regular: number,
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
    const wanted = Math.max(40, Math.ceil(0.03 * regular));
    for (let k = 0; k < wanted; k++) {
      const i = pixels[k % pixels.length];
      colours.push(rgb[i * 3], rgb[i * 3 + 1], rgb[i * 3 + 2]);
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
