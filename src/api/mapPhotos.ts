/**
 * `mapPhotos`: the library's one call for what `lamella map` does to a batch of photos — map
 * each, write its outputs into `outDir` as one set (replaced all together or not at all), write
 * the reports, and go on past a photo that fails. The caller says what to print (hooks).
 */
import { existsSync, readdirSync, rmdirSync } from 'node:fs';
import { basename, extname, join } from 'node:path';
import { InputError, UsageError } from '../errors.js';
import { loadCalibrationForRun } from '../calibrate/calibrationFile.js';
import { expandInputPaths, isGlobPattern } from '../series/expandInputs.js';
import type { KnownRegion } from '../calibrate/knownRegions.js';
import type { CameraResponse } from '../colour/toneResponse.js';
import { atomicWriteFile } from '../io/atomicWriteFile.js';
import { assertNoInputOverwritten, ensureOutputDir } from '../io/ensureOutputDir.js';
import { notedInputFiles } from '../io/inputFiles.js';
import { MAP_MAX_PIXELS } from '../io/limits.js';
import { provenanceOf } from '../io/provenance.js';
import { readPhoto } from '../io/readPhoto.js';
import { recoverStagedSets, writeOutputSet } from '../io/writeOutputSet.js';
import { colourTableFor, FieldSizeMismatchError, lineOfLight, mapDecodedPhoto, mapResultJson, readMask, writeMapOutputs, type MappedPhoto } from '../map/mapPhoto.js';
import { mapReportInput } from '../map/mapReportInput.js';
import { MAP_OUTPUT_FILES, MAP_OUTPUT_NAMES, type MapOutputName } from '../map/outputNames.js';
import type { MapOptions, MapPhase } from '../map/types.js';
import { renderMapReport } from '../report/index.js';
import { folderIndexPage, readFolderRecords, summaryCsv } from '../inspect/folderSummary.js';
import { checkInspectOptions, inspectionJson, inspectionRequested, inspectMap, pointsCsv, profileCsv, type Inspection, type InspectOptions } from '../inspect/inspectMap.js';
import { OutsidePhotoError } from '../inspect/samplePoints.js';
import { specSearchRangeNm } from '../inspect/spec.js';

export interface MapPhotosOptions {
  /** How to map (the stack resolved); `maskPath` is read once per photo. */
  readonly map: MapOptions;
  /** Output folder (created if missing). */
  readonly outDir: string;
  /** Which files to write per photo (default all). */
  readonly outputs?: Iterable<MapOutputName>;
  /** Calibrate on each photo itself from these regions of known thickness (the stack's name as given in `stackSpec`). */
  readonly known?: readonly KnownRegion[];
  readonly stackSpec?: string;
  /**
   * A calibration file from `calibrate`: its photo formation (and light field) is used instead of
   * fitting each photo. It must have been made for this stack, light, white balance, angle and
   * camera, unless `ignoreCalibrationMismatch`.
   */
  readonly calibrationFile?: string | null;
  readonly ignoreCalibrationMismatch?: boolean;
  /** A calibration file's content, shown in the report's calibration panel (set from `calibrationFile` when that is given). */
  readonly calibrationRecord?: Record<string, unknown> | null;
  /** Map photos the decoder reports as damaged as far as they decode. */
  readonly allowDamaged?: boolean;
  /**
   * Coating inspection (src/inspect): spec and pass/fail, edge exclusion, scale from the part,
   * points and profiles. A spec without `map.expectNm` also restricts the order search to the
   * spec widened by its width on each side (src/inspect/spec.ts, specSearchRangeNm).
   */
  readonly inspect?: InspectOptions | null;
}

export interface MapPhotosHooks {
  /** The batch is known (glob patterns expanded), before any photo is read. */
  readonly onStart?: (photos: readonly string[]) => void;
  /** A photo enters a stage ('decode', the map's phases, then 'outputs'). */
  readonly onPhase?: (photo: string, index: number, phase: 'decode' | MapPhase | 'outputs') => void;
  /** A warning about a photo, in plain words (prefixed with the photo's name). */
  readonly onWarning?: (message: string) => void;
  /** A photo's outputs are written. */
  readonly onPhoto?: (photo: string, result: MappedPhoto, record: Record<string, unknown>, inspection: Inspection | null) => void;
  /** A photo failed (the batch goes on). */
  readonly onFailure?: (photo: string, error: unknown) => void;
}

export interface MapPhotosResult {
  /** The photos of the batch, glob patterns expanded. */
  readonly photos: readonly string[];
  /** The JSON record of each photo mapped, in order. */
  readonly records: Record<string, unknown>[];
  readonly failed: string[];
  /** Photos with at least one thin region in their film. */
  readonly withThinRegions: number;
  /** Photos whose inspection verdict is fail (0 without a spec). */
  readonly outOfSpec: number;
}

/**
 * Maps photos and writes their outputs (see the module comment). Before any photo: names that
 * would collide (equal, or equal but for case), an output that is an input, and a film or light
 * the model cannot use are usage errors for the whole batch; a calibration's light field of
 * another size is too, when the first photo meets it.
 *
 * @param inputs photo file paths or glob patterns (`'shots/*.jpg'`, expanded in natural order of the names)
 * @param options how to map and what to write where
 * @param hooks what to tell the caller as the batch goes
 * @example
 * const { records, failed } = await mapPhotos(['a.jpg', 'b.jpg'], { map: { stack: resolveStack('soap-film'), light: 'D65', angleRad: 0, thinBelowNm: 50, maxThicknessNm: 2000 }, outDir: 'maps' });
 */
export async function mapPhotos(inputs: readonly string[], options: MapPhotosOptions, hooks: MapPhotosHooks = {}): Promise<MapPhotosResult> {
  const warn = hooks.onWarning ?? ((): void => undefined);
  const photos = await expandPhotoPatterns(inputs, warn);
  hooks.onStart?.(photos);
  if ((options.known ?? []).length > 0 && options.calibrationFile) {
    throw new UsageError('give either --known (calibrate on the photo) or --calibration (a calibration file), not both');
  }
  const calibrated = options.calibrationFile ? await withCalibration(options.map, options.calibrationFile, options) : null;
  const calibratedMap = calibrated?.map ?? options.map;
  const inspect = options.inspect ?? null;
  const inspecting = inspectionRequested(inspect);
  if (inspect) checkInspectOptions(inspect, calibratedMap.pixelSizeUm ?? null);
  // A spec without --expect keeps the order search near it (src/inspect/spec.ts).
  const specRange = inspect?.spec && !calibratedMap.expectNm ? specSearchRangeNm(inspect.spec, calibratedMap.maxThicknessNm) : null;
  const map: MapOptions = specRange ? { ...calibratedMap, expectNm: specRange } : calibratedMap;
  const calibrationRecord = calibrated?.record ?? options.calibrationRecord ?? null;
  const outputs = new Set(options.outputs ?? MAP_OUTPUT_NAMES);
  const writeReport = outputs.has('report');
  const known = options.known ?? [];
  const inspectSuffixes = [
    ...(inspect?.points ? ['.points.csv'] : []),
    ...(inspect?.profiles ?? []).map((_, k) => `.profile-${k + 1}.csv`),
  ];
  const suffixes = [...Object.values(MAP_OUTPUT_FILES), ...inspectSuffixes];
  const stems = photos.map((p) => basename(p, extname(p)));
  // Names that differ only in case (a.jpg, A.JPG) name one file on case-insensitive file systems.
  const folded = stems.map((s) => s.toLowerCase());
  const duplicate = stems.find((s, i) => folded.indexOf(folded[i]) !== i);
  if (duplicate) {
    const first = stems[folded.indexOf(duplicate.toLowerCase())];
    const names = first === duplicate ? `the name '${duplicate}'` : `the names '${first}' and '${duplicate}' (equal but for case)`;
    throw new UsageError(`two photos share ${names}: their outputs would collide; map them into different --out folders`);
  }
  // Every file the run reads (photos, mask, and the stack, material, SPD, camera and calibration
  // files read before) against every output, by identity, before any work.
  const plannedOutputs = stems.flatMap((stem) => suffixes.map((suffix) => join(options.outDir, stem + suffix))).concat(join(options.outDir, 'report.html'), join(options.outDir, 'summary.csv'));
  const runInputs = [...photos.map((path) => ({ path, role: 'photo' })), ...(map.maskPath ? [{ path: map.maskPath, role: '--mask' }] : [])];
  assertNoInputOverwritten(runInputs, plannedOutputs);
  // Build the colour table once before any photo: a film, light or angle the model cannot use
  // (e.g. a material outside its wavelength range) is a usage error, not a failed photo.
  if (lineOfLight(map.light) === null) colourTableFor(map);
  const outDirExisted = existsSync(options.outDir);
  const outDir = await ensureOutputDir(options.outDir, { inputs: runInputs, outputs: plannedOutputs });
  // What a run killed outright (SIGKILL) left here: finish or drop its output set.
  recoverStagedSets(outDir);
  const failed: string[] = [];
  let withThinRegions = 0;
  let outOfSpec = 0;
  const records: Record<string, unknown>[] = [];
  for (const [index, photo] of photos.entries()) {
    const stem = stems[index];
    const phase = (name: 'decode' | MapPhase | 'outputs'): void => hooks.onPhase?.(photo, index, name);
    // The reader's warnings until the photo's result carries them to onPhoto: a photo that fails
    // after it was read (a mask of another size, a full disk) still says it was damaged.
    let readerWarnings: readonly string[] = [];
    try {
      phase('decode');
      const decoded = await readPhoto(photo, { maxPixels: MAP_MAX_PIXELS, allowDamaged: options.allowDamaged === true });
      readerWarnings = decoded.warnings ?? [];
      const mask = map.maskPath ? await readMask(map.maskPath, decoded.width, decoded.height) : null;
      let photoOptions = map;
      if (known.length > 0) {
        // Loaded only for a calibration on the photo itself: its fit loads the least-squares
        // library, which a plain map does not need (about 0.1 s of start-up).
        const { calibrateDecoded } = await import('../calibrate/calibrate.js');
        const { DEFAULT_CALIBRATION_FIT } = await import('../calibrate/fitCalibration.js');
        const onPhoto = calibrateDecoded(decoded.rgb, decoded.width, decoded.height, basename(photo), {
          stack: map.stack,
          stackSpec: options.stackSpec ?? map.stack.name,
          light: map.light,
          whiteBalanceLight: map.whiteBalanceLight ?? null,
          camera: map.camera ?? 'srgb',
          angleRad: map.angleRad,
          known,
          fit: DEFAULT_CALIBRATION_FIT,
          lightField: map.lightField ?? 'auto',
        });
        const onPhotoFitted = onPhoto.fitted as { exposure: number; white_balance: [number, number, number]; flare: [number, number, number]; response: CameraResponse | null };
        const fitted = { exposure: onPhotoFitted.exposure, whiteBalance: onPhotoFitted.white_balance, flare: onPhotoFitted.flare, response: onPhotoFitted.response };
        const field = (onPhoto.exposure_field as { log_gain_coefficients: number[] | null }).log_gain_coefficients;
        photoOptions = {
          ...map,
          exposureFixed: { ...fitted, responseSource: fitted.response ? 'calibration' : 'identity' },
          exposureFieldFixed: field ? { logGainCoefficients: field, widthPx: decoded.width, heightPx: decoded.height, file: photo, ignoreSizeMismatch: false } : null,
        };
        for (const warning of onPhoto.warnings) warn(`${photo}: calibration: ${warning}`);
      }
      let result = mapDecodedPhoto(decoded, { ...photoOptions, onPhase: hooks.onPhase ? phase : null }, mask, photo);
      // The reader's warnings (a damaged file, a colour profile) come first, in the record too.
      if (decoded.warnings?.length) result = { ...result, warnings: [...decoded.warnings, ...result.warnings] };
      if (specRange && map.expectNm) {
        // The search range came from --spec, not from an --expect the user gave: say so.
        const given = `--expect ${map.expectNm[0]}-${map.expectNm[1]} nm`;
        const said = `${map.expectNm[0]}-${map.expectNm[1]} nm (the search range of --spec ${inspect!.spec!.text})`;
        result = { ...result, warnings: result.warnings.map((w) => w.split(given).join(said)) };
      }
      const inspection = inspecting && inspect ? inspectMap(result, inspect, photoOptions.pixelSizeUm ?? null) : null;
      if (inspection && inspection.scale.pixelSizeUm !== null && photoOptions.pixelSizeUm == null) {
        // The scale found from the part holds for this photo's areas, scale bar and TIFF.
        const px = inspection.scale.pixelSizeUm;
        photoOptions = { ...photoOptions, pixelSizeUm: px };
        result = {
          ...result,
          thinRegions: result.thinRegions.map((r) => ({ ...r, areaUm2: r.areaPx * px * px })),
          ...(result.filmArea ? { filmArea: { ...result.filmArea, areaUm2: result.filmArea.areaPx * px * px } } : {}),
        };
      }
      phase('outputs');
      // Which Lamella made it, from which files (SHA-256 of the photo, mask and data files read).
      const record = {
        ...mapResultJson(result, photoOptions, photo),
        ...(inspection ? { inspection: inspectionJson(inspection) } : {}),
        provenance: await provenanceOf([{ path: photo, role: 'photo' }, ...(map.maskPath ? [{ path: map.maskPath, role: '--mask' }] : []), ...notedInputFiles()]),
      };
      // The photo's new outputs replace its old ones all together or not at all, even when
      // interrupted or the disk fills up (with one photo, report.html belongs to the set).
      const setNames = suffixes.map((suffix) => stem + suffix).concat(photos.length === 1 ? ['report.html'] : []);
      await writeOutputSet(setNames.map((name) => join(outDir, name)), async (staging) => {
        const selection = {
          npy: outputs.has('npy'), tiff: outputs.has('tif'), confidence: outputs.has('confidence'), status: outputs.has('status'),
          images: false, map: outputs.has('map'), flags: outputs.has('flags'), json: outputs.has('json'),
          outline: inspection?.outOfSpec ?? null,
          outlineLabel: inspection?.spec ? `dashed: out of ${inspection.spec.spec.text}` : null,
        };
        await writeMapOutputs(result, photo, staging, stem, selection, photoOptions, record);
        if (inspection?.points) await atomicWriteFile(join(staging, `${stem}.points.csv`), Buffer.from(pointsCsv(inspection.points), 'utf8'));
        for (const [k, samples] of inspection?.profiles.entries() ?? []) {
          await atomicWriteFile(join(staging, `${stem}.profile-${k + 1}.csv`), Buffer.from(profileCsv(samples, inspection!.scale.pixelSizeUm), 'utf8'));
        }
        if (writeReport) {
          const html = renderMapReport({ ...(await mapReportInput(result, photoOptions, photo, record, inspection?.outOfSpec ?? null)), calibration: calibrationRecord });
          await atomicWriteFile(join(staging, `${stem}.report.html`), Buffer.from(html, 'utf8'));
          if (photos.length === 1) await atomicWriteFile(join(staging, 'report.html'), Buffer.from(html, 'utf8'));
        }
      });
      records.push(record);
      // Thin regions lie in the film only; a photo without film has none to report.
      if (result.thinRegions.length > 0 && result.filmArea?.found !== false) withThinRegions++;
      if (inspection?.verdict && !inspection.verdict.pass) outOfSpec++;
      readerWarnings = [];
      hooks.onPhoto?.(photo, result, record, inspection);
    } catch (error) {
      for (const warning of readerWarnings) warn(`${photo}: ${warning}`);
      // A calibration's light field made for another photo size holds for the whole run.
      if (error instanceof FieldSizeMismatchError) throw error;
      // A point or line outside the photo is a mistake in the options, not in this photo.
      if (error instanceof OutsidePhotoError) {
        if (records.length === 0 && !outDirExisted) removeIfEmpty(outDir);
        throw error;
      }
      failed.push(photo);
      hooks.onFailure?.(photo, error);
    }
  }
  // The folder's summary and index, rebuilt from every map record in it (this run's and earlier
  // runs'), whenever the run mapped several photos or the folder holds several maps.
  if (records.length > 0) {
    const inFolder = readFolderRecords(outDir);
    if (photos.length > 1 || inFolder.length > 1) {
      await atomicWriteFile(join(outDir, 'summary.csv'), Buffer.from(summaryCsv(inFolder), 'utf8'));
      if (writeReport) await atomicWriteFile(join(outDir, 'report.html'), Buffer.from(folderIndexPage(outDir, inFolder), 'utf8'));
    }
  }
  // A folder this run made and filled with nothing (every photo failed) is not left behind.
  if (records.length === 0 && !outDirExisted) removeIfEmpty(outDir);
  return { photos, records, failed, withThinRegions, outOfSpec };
}

/**
 * Glob patterns expanded as `runSeries` expands them; anything else is a photo path (a missing
 * file or a folder then fails as that photo, and the other photos go on).
 */
async function expandPhotoPatterns(inputs: readonly string[], warn: (message: string) => void): Promise<string[]> {
  const photos: string[] = [];
  for (const input of inputs) {
    if (!isGlobPattern(input) || existsSync(input)) {
      photos.push(input);
      continue;
    }
    const expanded = await expandInputPaths([input], process.cwd(), { absolute: false });
    for (const warning of expanded.warnings) warn(warning);
    photos.push(...expanded.paths.filter((path) => !photos.includes(path)));
  }
  if (photos.length === 0) throw new InputError(inputs.join(' '), 'no photos to map (the patterns given match no file)');
  return photos;
}

/** The map options with a calibration file's photo formation, after checking it fits the run. */
async function withCalibration(map: MapOptions, file: string, options: MapPhotosOptions): Promise<{ map: MapOptions; record: Record<string, unknown> }> {
  const ignoreMismatch = options.ignoreCalibrationMismatch === true;
  const calibration = await loadCalibrationForRun(file, {
    stack: options.stackSpec ?? map.stack.name,
    light: map.light,
    angleRad: map.angleRad,
    whiteBalanceLight: map.whiteBalanceLight ?? null,
    camera: map.camera ?? 'srgb',
    ignoreMismatch,
  });
  return {
    map: {
      ...map,
      filmIndexScale: calibration.filmIndexScale ?? undefined,
      exposureFixed: calibration.exposureFixed ?? null,
      exposureFieldFixed: calibration.exposureField ? { ...calibration.exposureField, file, ignoreSizeMismatch: ignoreMismatch } : null,
    },
    record: calibration.raw,
  };
}

function removeIfEmpty(dir: string): void {
  try {
    if (readdirSync(dir).length === 0) rmdirSync(dir);
  } catch {
    // Left as it is: a folder that cannot be listed or removed is not worth a second error.
  }
}
