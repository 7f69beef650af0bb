/**
 * File-level entry points of the mapper: read a photo, map it (colour mode, or the
 * monochromatic mode for a single-line light), and write every output atomically.
 *
 * Outputs for `<stem>` in the output folder:
 *   <stem>.thickness.npy (float32 nm, NaN = no estimate), <stem>.thickness.tif (float32),
 *   <stem>.confidence.npy (float32 0..1), <stem>.status.npy (uint8 PixelStatus codes, ./types.ts),
 *   <stem>.map.png, <stem>.flags.png, <stem>.json, and the report.
 */
import { type LightFieldStart, mapWithLightField } from './lightField.js';
import { encodeSrgb } from '../colour/srgb.js';
import { unlink } from 'node:fs/promises';
import { basename } from 'node:path';
import { join } from 'node:path';
import { resolveLight } from '../colour/index.js';
import { InputError, UsageError } from '../errors.js';
import { readPhoto } from '../io/readPhoto.js';
import { MAP_MAX_PIXELS } from '../io/limits.js';
import { writeNpy } from '../io/encodeNpy.js';
import { thicknessTiffDescription, writeFloatTiff } from '../io/encodeFloatTiff.js';
import { atomicWriteFile } from '../io/atomicWriteFile.js';
import type { Photo } from '../io/photo.js';
import { floatPixels, type PhotoPixels, pixelsOfPhoto, valueAt } from './photoPixels.js';
import { isMonochromaticLight, mapMonochromatic } from '../mono/index.js';
import { type BuiltColourTable, buildColourTable } from './buildColourTable.js';
import { buildFilmMask } from './filmMask.js';
import { mapPixels, type MapPixelsResult } from './mapPixels.js';
import { defaultThreads } from './pixelThreads.js';
import { chromaWeightFor } from './matchSpace.js';
import { renderFlagsPng, renderMapPng, scaleRangeOf } from './mapImages.js';
import { findThinRegions } from './thinRegions.js';
import type { Anchor, ExposureParameters, MapOptions, MapResult } from './types.js';
import { mapResultJson } from './mapResultJson.js';

export { mapResultJson } from './mapResultJson.js';

/**
 * A map plus what is needed to write its outputs. Why pixels lack an estimate and how many poor
 * matches their neighbours kept are present on a fresh map, absent on one read back from disk.
 */
export type MappedPhoto = MapResult & Partial<Pick<MapPixelsResult, 'ambiguousReasons' | 'keptByNeighbours'>> & {
  /** The decoded photo's encoded RGB (for the flags image and the report; ./photoPixels.ts). */
  readonly photoPixels?: PhotoPixels;
  readonly extra?: Record<string, unknown>;
  /** The coating inspection's JSON block (src/inspect), when one was asked for (a series frame's record). */
  readonly inspection?: Record<string, unknown> | null;
};

const tableCache = new Map<string, BuiltColourTable>();

/** Builds (once per distinct setting, per thread) the colour table a map needs. */
export function colourTableFor(options: MapOptions): BuiltColourTable {
  const key = JSON.stringify([
    options.stack.name,
    options.stack.layers.map((l) => [l.material.name, l.thicknessNm]),
    options.stack.substrate.name,
    options.light,
    options.whiteBalanceLight ?? null,
    options.camera ?? 'srgb',
    options.angleRad,
    options.filmIndexScale ?? 1,
    options.maxThicknessNm,
  ]);
  let built = tableCache.get(key);
  if (!built) {
    built = buildColourTable({
      stack: options.stack,
      angleRad: options.angleRad,
      light: options.light,
      whiteBalanceLight: options.whiteBalanceLight,
      camera: options.camera,
      filmIndexScale: options.filmIndexScale,
      maxThicknessNm: options.maxThicknessNm,
    });
    if (tableCache.size > 8) tableCache.clear();
    tableCache.set(key, built);
  }
  return built;
}

/** The line wavelength when the light is a single spectral line, else null. */
export function lineOfLight(spec: string): number | null {
  const direct = isMonochromaticLight(spec);
  if (direct !== null) return direct;
  const light = resolveLight(spec);
  if (light.kind === 'line') return light.lineNm ?? null;
  return isMonochromaticLight({ wavelengthsNm: light.wavelengthsNm, values: light.relativeSpd });
}

export async function readMask(path: string, width: number, height: number): Promise<Uint8Array> {
  const mask = await readPhoto(path);
  if (mask.width !== width || mask.height !== height) {
    throw new InputError(path, `mask is ${mask.width}×${mask.height} but the photo is ${width}×${height}`);
  }
  const out = new Uint8Array(width * height);
  const pixels = pixelsOfPhoto(mask);
  for (let i = 0; i < out.length; i++) {
    out[i] = valueAt(pixels, i * 3) + valueAt(pixels, i * 3 + 1) + valueAt(pixels, i * 3 + 2) > 0 ? 1 : 0;
  }
  return out;
}

/** Maps one decoded photo. */
export function mapDecodedPhoto(photo: Photo, options: MapOptions, mask: Uint8Array | null, source: string): MappedPhoto {
  const lineNm = lineOfLight(options.light);
  if (lineNm !== null) {
    const result = mapMonochromatic(photo, options, lineNm, mask);
    return { ...result, photoPixels: pixelsOfPhoto(photo) };
  }
  if (photo.alpha && !photo.alpha.some((a) => a >= 0.5)) {
    throw new InputError(source, 'holds no film: every pixel is transparent');
  }
  if (photo.isGrey) {
    throw new InputError(
      source,
      'is a grey-scale photo: it holds no colour information to map. Give a single-line light (e.g. --light line:546) to map it by intensity',
    );
  }
  const built = colourTableFor(options);
  // A linear camera's values are sRGB-encoded once here: the table is matched in encoded units
  // (buildColourTable.ts), and the same monotone encoding on both sides leaves the model exact.
  const rgb = built.camera.encoding === 'linear' ? floatPixels(encodeLinearPhoto(photo.rgb)) : pixelsOfPhoto(photo);
  const film = buildFilmMask(photo.width, photo.height, options.region, mask, photo.alpha);
  const mapAt = (pixels: PhotoPixels, at: FrameGeometry, fitStart: ExposureParameters | null = null, fixed: ExposureParameters | null = null, fittedOn: MapPixelsResult | null = null) => mapPixels({
    maxGridCells: at.maxGridCells,
    rgb: pixels,
    width: at.width,
    height: at.height,
    film: at.film,
    table: built.table,
    orderPeriodNm: built.orderPeriodNm,
    thinBelowNm: options.thinBelowNm,
    pixelSizeUm: at.pixelSizeUm,
    anchors: at.anchors,
    prior: at.prior,
    priorStatus: at.priorStatus,
    exposureFixed: fixed ?? options.exposureFixed ?? null,
    fitStart: fitStart ?? options.fitStart ?? null,
    adoptedFit: fittedOn?.fit ? { fit: fittedOn.fit, parameters: fittedOn.fitted } : null,
    // A start from within this photo (a light-field round, the preview's fit) is followed as it
    // is; a series frame's own first fit does not depend on the frame before (MapOptions.ownFit).
    ownFit: fitStart === null && options.ownFit === true,
    keepConsistent: options.keepConsistent ?? true,
    threads: options.threads ?? defaultThreads(),
    onPhase: options.onPhase ?? null,
    chromaWeight: chromaWeightFor(photo.format, photo.chromaSubsampling),
    eightBit: photo.bitDepth === 8,
    filmArea: options.filmArea ?? 'auto',
    expectNm: options.expectNm ?? null,
  });
  const full: FrameGeometry = {
    width: photo.width,
    height: photo.height,
    film,
    prior: options.prior ?? null,
    priorStatus: options.priorStatus ?? null,
    anchors: options.anchors ?? [],
    pixelSizeUm: options.pixelSizeUm ?? null,
  };
  // Uneven light: the exposure is fitted as a smooth field by alternation (./lightField.ts), on a
  // subsampled preview when the photo is large.
  const preview = previewOf(rgb, full, PREVIEW_PX);
  const roundsPreview = preview ? previewOf(rgb, full, ROUNDS_PREVIEW_PX) : null;
  const { result, field } = mapWithLightField<MapPixelsResult, MapPixelsResult>({
    rgb,
    width: photo.width,
    height: photo.height,
    // The full map of a large photo also takes its preview's film area as a prior (as a series
    // frame takes the previous frame's): where the preview placed a dark region in the film (black
    // film at the border), the full map keeps it there (filmArea.ts, followPriorFilm). The full
    // map's finer grid sees a black front's blurred edge as colours no thickness gives, which
    // under uneven light hid a 9 % black-film band at the top of the 12 MP demo frame as "dark
    // surroundings" (and its rupture risk with it).
    mapWith: (pixels, fitStart, fixed, fittedOn) => mapAt(pixels, withPreviewPrior(full, fittedOn ?? null), fitStart ?? null, fixed ?? null, fittedOn ?? null),
    mode: options.lightField ?? 'auto',
    fullSizeFirst: options.fullSizeFirst === true,
    eightBit: photo.bitDepth === 8 && built.camera.encoding !== 'linear',
    threads: options.threads ?? defaultThreads(),
    start: lightFieldStartOf(options, photo.width, photo.height),
    preview: preview
      ? {
          rgb: preview.rgb,
          width: preview.at.width,
          height: preview.at.height,
          mapWith: (pixels, fitStart, fixed) => mapAt(pixels, preview.at, fitStart ?? null, fixed ?? null),
          mapCentreWith: (pixels) => mapAt(pixels, centreOf(preview.at)),
          rounds: roundsPreview
            ? { rgb: roundsPreview.rgb, width: roundsPreview.at.width, height: roundsPreview.at.height, mapWith: (pixels, fitStart, fixed) => mapAt(pixels, roundsPreview.at, fitStart ?? null, fixed ?? null) }
            : null,
        }
      : null,
    mapCentreWith: (pixels) => mapAt(pixels, centreOf(full)),
  });
  const warnings = [...result.warnings];
  if (built.camera.encoding === 'linear' && photo.bitDepth === 8) {
    warnings.push(
      'an 8-bit photo read as linear (--camera): 8 bits proportional to light leave dark colours in a few codes, so thin and dark film is coarse; use the camera\'s 16-bit linear output',
    );
  }
  return {
    ...result,
    warnings,
    exposureField: field,
    photoPixels: rgb,
    extra: {
      camera: built.camera.description,
      order_period_nm: built.orderPeriodNm,
      noise_sigma: result.noiseSigma,
      washout_nm: result.washoutNm,
      no_estimate_reasons: result.ambiguousReasons,
      poor_matches_kept_by_neighbours: result.keptByNeighbours,
      chroma_subsampling: photo.chromaSubsampling ?? null,
      chroma_weight: chromaWeightFor(photo.format, photo.chromaSubsampling),
      fit: result.fit
        ? { standard_errors: result.fit.standardErrors, rms_residual: result.fit.rmsResidual, samples_used: result.fit.samplesUsed }
        : null,
    },
  };
}

export async function mapPhotoFile(path: string, options: MapOptions, read: { allowDamaged?: boolean } = {}): Promise<MappedPhoto> {
  const photo = await readPhoto(path, { maxPixels: MAP_MAX_PIXELS, allowDamaged: read.allowDamaged === true });
  const mask = options.maskPath ? await readMask(options.maskPath, photo.width, photo.height) : null;
  if ((options.prior && options.prior.length !== photo.width * photo.height) || (options.priorStatus && options.priorStatus.length !== photo.width * photo.height)) {
    throw new InputError(path, `frame is ${photo.width}×${photo.height}, a different size from the previous frame`);
  }
  const result = mapDecodedPhoto(photo, options, mask, path);
  // The reader's warnings (a damaged file, a colour profile) come first.
  return photo.warnings?.length ? { ...result, warnings: [...photo.warnings, ...result.warnings] } : result;
}

export interface OutputSelection {
  /** `<stem>.map.png` and `<stem>.flags.png` (each unless `map` / `flags` says otherwise). */
  readonly images: boolean;
  readonly json: boolean;
  /** `<stem>.thickness.npy`, with `.confidence.npy` and `.status.npy` unless `confidence` / `status` says otherwise. */
  readonly npy: boolean;
  readonly tiff: boolean;
  readonly confidence?: boolean;
  readonly status?: boolean;
  readonly map?: boolean;
  readonly flags?: boolean;
  /** Pixels whose outline the map picture draws (e.g. out of spec, src/inspect); default none. */
  readonly outline?: Uint8Array | null;
  /** What the outline marks, added to the map picture's title (e.g. `dashed: out of 100±5 nm`). */
  readonly outlineLabel?: string | null;
  /** The map picture's colour range [min, max] nm (a series' common range); default the map's own. */
  readonly rangeNm?: readonly [number, number] | null;
}

/**
 * Writes the selected outputs of a map atomically; returns the paths written. `options` is
 * needed for the JSON record. If any write fails (a full disk, say), the files already written
 * for this photo are removed again, so the folder never holds half of a photo's outputs.
 */
export async function writeMapOutputs(
  result: MappedPhoto,
  photoPath: string,
  outDir: string,
  stem: string,
  what: OutputSelection,
  options?: MapOptions,
  /** The JSON record when the caller has built it already (see mapResultJson). */
  record?: Record<string, unknown>,
): Promise<string[]> {
  const written: string[] = [];
  try {
    await writeEachOutput(result, photoPath, outDir, stem, what, options, record, written);
  } catch (error) {
    await Promise.all(written.map((file) => unlink(file).catch(() => undefined)));
    throw error;
  }
  return written;
}

async function writeEachOutput(
  result: MappedPhoto,
  photoPath: string,
  outDir: string,
  stem: string,
  what: OutputSelection,
  options: MapOptions | undefined,
  record: Record<string, unknown> | undefined,
  written: string[],
): Promise<void> {
  const { width, height } = result;
  if (what.json && !options) throw new TypeError('writeMapOutputs: options are required to write the JSON record');
  // The writes and the image encoders run in the codec's and the file system's threads, so they
  // are started together and overlap with each other and with the pictures' per-pixel work.
  const tasks: Array<Promise<void>> = [];
  const start = (path: string, write: () => Promise<void>): void => {
    tasks.push(write().then(() => void written.push(path)));
  };
  if (what.npy) {
    const thicknessPath = join(outDir, `${stem}.thickness.npy`);
    start(thicknessPath, () => writeNpy(thicknessPath, result.thicknessNm, [height, width]));
  }
  if (what.confidence ?? what.npy) {
    const confidencePath = join(outDir, `${stem}.confidence.npy`);
    start(confidencePath, () => writeNpy(confidencePath, result.confidence, [height, width]));
  }
  if (what.status ?? what.npy) {
    const statusPath = join(outDir, `${stem}.status.npy`);
    start(statusPath, () => writeNpy(statusPath, result.status, [height, width]));
  }
  if (what.tiff) {
    const tiffPath = join(outDir, `${stem}.thickness.tif`);
    const pixelSizeUm = options?.pixelSizeUm ?? null;
    start(tiffPath, () => writeFloatTiff(tiffPath, result.thicknessNm, width, height, { pixelSizeUm, description: thicknessTiffDescription(pixelSizeUm) }));
  }
  if (what.json) {
    const jsonPath = join(outDir, `${stem}.json`);
    const json = record ?? mapResultJson(result, options!, photoPath);
    start(jsonPath, () => atomicWriteFile(jsonPath, Buffer.from(`${JSON.stringify(json, null, 2)}\n`, 'utf8')));
  }
  if (what.map ?? what.images) {
    const range = what.rangeNm ? { minNm: what.rangeNm[0], maxNm: what.rangeNm[1] } : scaleRangeOf(result);
    const mapPath = join(outDir, `${stem}.map.png`);
    const mapPng = renderMapPng(result, range, options?.pixelSizeUm ?? null, `${basename(photoPath)} — thickness${what.outline && what.outlineLabel ? `; ${what.outlineLabel}` : ''}`, what.outline ?? null);
    start(mapPath, async () => atomicWriteFile(mapPath, await mapPng));
  }
  if (what.flags ?? what.images) {
    if (result.photoPixels) {
      // The labels and the regions they number, from one labelling.
      const thin = result.thinLabels ? { labels: result.thinLabels, regions: result.thinRegions } : findThinRegions(result.thicknessNm, result.status, width, height, options?.thinBelowNm ?? null, null);
      const flagsPath = join(outDir, `${stem}.flags.png`);
      const flagsPng = renderFlagsPng(result.photoPixels, width, height, thin.labels, result.status, options?.pixelSizeUm ?? null, thin.regions.map((r) => r.bbox));
      start(flagsPath, async () => atomicWriteFile(flagsPath, await flagsPng));
    }
  }
  const outcomes = await Promise.allSettled(tasks);
  const failure = outcomes.find((o): o is PromiseRejectedResult => o.status === 'rejected');
  if (failure) throw failure.reason;
}

/** A calibration's light field made for another photo size: a usage error for the whole run. */
export class FieldSizeMismatchError extends UsageError {}

/** What a map needs to know about the frame besides its pixels (full size, or a subsampled preview). */
interface FrameGeometry {
  readonly width: number;
  readonly height: number;
  readonly film: Uint8Array;
  readonly prior: Float32Array | null;
  /** The previous frame's pixel statuses (a series' film-area prior), or null. */
  readonly priorStatus: Uint8Array | null;
  readonly anchors: readonly Anchor[];
  readonly pixelSizeUm: number | null;
  /** Most cells of the order-resolution grid (a preview's is coarser: PREVIEW_GRID_CELLS); default the mapper's. */
  readonly maxGridCells?: number;
}

/** Share of the photo's width and height measured first when one exposure explains no film (./lightField.ts). */
const CENTRE_SHARE = 0.5;

/** The geometry with its film mask cut to the middle CENTRE_SHARE of the photo. */
function centreOf(at: FrameGeometry): FrameGeometry {
  const film = new Uint8Array(at.film.length);
  const x0 = Math.floor((at.width * (1 - CENTRE_SHARE)) / 2);
  const y0 = Math.floor((at.height * (1 - CENTRE_SHARE)) / 2);
  const x1 = at.width - x0;
  const y1 = at.height - y0;
  for (let y = y0; y < y1; y++) for (let x = x0; x < x1; x++) film[y * at.width + x] = at.film[y * at.width + x];
  return { ...at, film, anchors: at.anchors.filter((a) => a.x >= x0 && a.x < x1 && a.y >= y0 && a.y < y1) };
}

/**
 * The frame with a preview map's pixel statuses, scaled to its size by nearest pixel, as its prior
 * film area; unchanged when there is no preview map or the frame has a prior already (a series).
 */
function withPreviewPrior(at: FrameGeometry, preview: MapResult | null): FrameGeometry {
  if (!preview || at.priorStatus) return at;
  const { width, height } = at;
  const pw = preview.width;
  const ph = preview.height;
  const columns = new Int32Array(width);
  for (let x = 0; x < width; x++) columns[x] = Math.min(pw - 1, Math.floor((x * pw) / width));
  const prior = new Uint8Array(width * height);
  for (let y = 0; y < height; y++) {
    const from = Math.min(ph - 1, Math.floor((y * ph) / height)) * pw;
    const to = y * width;
    for (let x = 0; x < width; x++) prior[to + x] = preview.status[from + columns[x]];
  }
  return { ...at, priorStatus: prior };
}

/** Photos above this many pixels get their light field fitted on a subsampled preview. */
export const LIGHT_FIELD_PREVIEW_ABOVE_PX = 1_000_000;
/** About this many pixels in the preview. */
const PREVIEW_PX = 120_000;
/**
 * About this many in the copy the light field's rounds map (after the first map on the preview,
 * which finds the film): a round measures a smooth surface of seven numbers. Measured on the
 * 12-MP demo frame under 35 % fall-off against its true thickness, rounds on 60 k, 40 k and 30 k
 * pixels give p95 errors of 1.80, 1.79 and 1.77 nm (1.78 with rounds on the preview itself), and
 * each round costs about a third less than on the preview. A round whose copy loses the film
 * falls back to the preview (lightField.ts).
 */
const ROUNDS_PREVIEW_PX = 40_000;
/**
 * The preview's orders are resolved on blocks of 2×2 preview pixels (about 30 k cells): the
 * preview serves the light field, a smooth surface fitted to pixels whose orders are known, and
 * each alternation round pays for the grid again (a judgement, measured on the 12 MP demo frame
 * evenly and unevenly lit: see DEVELOPERS.md).
 */
const PREVIEW_GRID_CELLS = 40_000;

/**
 * A point-sampled copy (every k-th pixel of every k-th row, no averaging: averaging would mix the
 * colours of neighbouring thicknesses) of a large photo, its film mask, prior and anchors.
 */
function previewOf(rgb: PhotoPixels, at: FrameGeometry, pixels: number): { rgb: PhotoPixels; at: FrameGeometry } | null {
  const { width, height } = at;
  if (width * height <= LIGHT_FIELD_PREVIEW_ABOVE_PX) return null;
  const k = Math.max(2, Math.round(Math.sqrt((width * height) / pixels)));
  const offset = Math.floor(k / 2);
  const w = Math.floor((width - offset - 1) / k) + 1;
  const h = Math.floor((height - offset - 1) / k) + 1;
  const small = new Float32Array(new SharedArrayBuffer(w * h * 3 * 4));
  const film = new Uint8Array(w * h);
  const prior = at.prior ? new Float32Array(w * h) : null;
  const priorStatus = at.priorStatus ? new Uint8Array(w * h) : null;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const src = (y * k + offset) * width + (x * k + offset);
      const dst = y * w + x;
      small[dst * 3] = valueAt(rgb, src * 3);
      small[dst * 3 + 1] = valueAt(rgb, src * 3 + 1);
      small[dst * 3 + 2] = valueAt(rgb, src * 3 + 2);
      film[dst] = at.film[src];
      if (prior && at.prior) prior[dst] = at.prior[src];
      if (priorStatus && at.priorStatus) priorStatus[dst] = at.priorStatus[src];
    }
  }
  const anchors = at.anchors
    .map((a) => ({ ...a, x: Math.min(w - 1, Math.round((a.x - offset) / k)), y: Math.min(h - 1, Math.round((a.y - offset) / k)) }))
    .filter((a) => a.x >= 0 && a.y >= 0);
  return { rgb: floatPixels(small), at: { width: w, height: h, film, prior, priorStatus, anchors, pixelSizeUm: at.pixelSizeUm === null ? null : at.pixelSizeUm * k, maxGridCells: PREVIEW_GRID_CELLS } };
}

/**
 * Where the light field starts: a calibration's field (applied as it is, on a photo of the size it
 * was fitted on), else a series' previous frame's field, else nowhere.
 */
function lightFieldStartOf(options: MapOptions, width: number, height: number): LightFieldStart | null {
  const fixed = options.exposureFieldFixed ?? null;
  if (fixed) {
    if ((fixed.widthPx !== width || fixed.heightPx !== height) && !fixed.ignoreSizeMismatch) {
      throw new FieldSizeMismatchError(
        `--calibration ${fixed.file}: its light field was fitted on a ${fixed.widthPx}×${fixed.heightPx} photo, this photo is ${width}×${height}; a field belongs to one camera position and framing (calibrate on a photo of this size, or add --ignore-calibration-mismatch to stretch it over this photo)`,
      );
    }
    return { logGainCoefficients: fixed.logGainCoefficients, flare: options.exposureFixed?.flare ?? [0, 0, 0], response: options.exposureFixed?.response ?? null, use: 'fixed' };
  }
  if (options.fieldStart && options.lightField !== 'off') {
    return { logGainCoefficients: options.fieldStart, flare: options.fitStart?.flare ?? [0, 0, 0], response: options.fitStart?.response ?? null, use: 'start' };
  }
  return null;
}

/** sRGB-encodes a linear photo's values (a copy in shared memory, for the mapper's threads). */
export function encodeLinearPhoto(linear: Float32Array): Float32Array {
  const out = new Float32Array(new SharedArrayBuffer(linear.length * 4));
  for (let i = 0; i < linear.length; i++) out[i] = encodeSrgb(linear[i] < 0 ? 0 : linear[i] > 1 ? 1 : linear[i]);
  return out;
}
