/**
 * `lamella map PHOTO... --stack S --out DIR`: thickness maps from photos. Each photo is mapped
 * and its outputs written atomically; a bad photo is reported and the others go on (exit 3 at
 * the end). `--fail-if-thin` turns a thin region into exit status 1.
 */
import { type CameraResponse, describeResponse, isStrongResponse } from '../../colour/toneResponse.js';
import { CAMERA_HELP, parseCameraOption } from '../cameraOption.js';
import { MAP_OUTPUT_FILES, OUTPUTS_HELP, parseOutputsOption } from '../outputsOption.js';
import { LIGHT_FIELD_HELP, parseLightFieldOption } from '../lightFieldOption.js';
import type { Command } from 'commander';
import { basename, extname, join } from 'node:path';
import { existsSync, readdirSync, rmdirSync } from 'node:fs';
import { expandInputPaths, isGlobPattern } from '../../series/expandInputs.js';
import { EXIT_FINDING, EXIT_INPUT, InputError, oneLine } from '../errors.js';
import { addStackOptions, stackFromOptions, type StackCliOptions } from '../stackOptions.js';
import { addFilmAreaOptions, filmAreaFromOptions, type FilmAreaCliOptions } from '../filmAreaOptions.js';
import { collect, parseKnown } from '../parseGeometry.js';
import { UsageError } from '../errors.js';
import { FieldSizeMismatchError } from '../../map/mapPhoto.js';
import { notedInputFiles } from '../../io/inputFiles.js';
import { provenanceOf } from '../../io/provenance.js';
import { parseDecimal } from '../parseDecimal.js';
import { ensureOutputDir, assertNoInputOverwritten } from '../../io/ensureOutputDir.js';
import { atomicWriteFile } from '../../io/atomicWriteFile.js';
import { recoverStagedSets, writeOutputSet } from '../../io/writeOutputSet.js';
import { colourTableFor, lineOfLight, mapDecodedPhoto, readMask, writeMapOutputs, mapResultJson } from '../../map/mapPhoto.js';
import { addLightOptions, lightsFromOptions } from '../lightOptions.js';
import { readPhoto } from '../../io/readPhoto.js';
import { MAP_MAX_PIXELS } from '../../io/limits.js';
import { calibrateDecoded } from '../../calibrate/calibrate.js';
import { mapReportInput } from '../../map/mapReportInput.js';
import { renderMapReport } from '../../report/index.js';
import type { MapOptions, MapResult } from '../../map/types.js';
import { loadCalibrationForRun } from '../../calibrate/calibrationFile.js';
import { mapIndexPage } from '../../map/mapIndexPage.js';

interface MapCliOptions extends StackCliOptions, FilmAreaCliOptions {
  light: string;
  whiteBalance?: string;
  camera?: string;
  calibration?: string;
  known?: string[];
  ignoreCalibrationMismatch?: boolean;
  out: string;
  json?: boolean;
  report: boolean;
  failIfThin?: boolean;
  quiet?: boolean;
  threads?: string;
  allowDamaged?: boolean;
  lightField?: string;
  outputs?: string;
}

export const OUTPUT_SUFFIXES: string[] = Object.values(MAP_OUTPUT_FILES);

/** The stages a photo goes through, as the terminal shows them. */
const PHASE_WORDS = {
  decode: 'reading the photo',
  fit: 'fitting exposure, white balance and flare',
  orders: 'resolving the interference orders',
  pixels: 'matching every pixel',
  summaries: 'summarising',
  outputs: 'writing the outputs',
} as const;

export function register(program: Command): void {
  const command = program
    .command('map')
    .description('map film thickness from colour photos; writes .npy/.tif maps, confidence, previews, JSON and an HTML report per photo')
    .argument('<photo...>', "photos (JPEG, PNG, TIFF; 8 or 16 bit) or glob patterns such as 'shots/*.jpg' (quoted)");
  addFilmAreaOptions(addLightOptions(addStackOptions(command), { required: false }), 'photo')
    .option('--camera <mode-or-file>', CAMERA_HELP)
    .option('--light-field <mode>', LIGHT_FIELD_HELP, 'auto')
    .option('--calibration <file>', 'photo-formation parameters (and light field) from `lamella calibrate` instead of fitting them')
    .option('--ignore-calibration-mismatch', 'use a calibration made for another stack or light')
    .option('--known <x,y,w,h=nm>', 'calibrate on each photo itself from a rectangle of known thickness (repeatable)', collect)
    .requiredOption('--out <dir>', 'output folder (created if missing)')
    .option('--json', 'print the JSON record(s) on stdout')
    .option('--outputs <list>', OUTPUTS_HELP)
    .option('--no-report', 'do not write the HTML report (the same as leaving report out of --outputs)')
    .option('--fail-if-thin', 'exit with status 1 when any photo has a thin region')
    .option('--threads <n>', 'threads for the per-pixel pass of photos of 1 MP or more (default: the cores, at most 4)')
    .option('--allow-damaged', 'map photos the decoder reports as damaged as far as they decode (a warning; the rest has no estimate)')
    .option('--quiet', 'print nothing but errors')
    .action(async (inputs: string[], opts: MapCliOptions) => {
      process.exitCode = await runMap(inputs, opts);
    });
}

async function runMap(inputs: string[], opts: MapCliOptions): Promise<number> {
  const warn = (message: string): void => {
    if (!opts.quiet) process.stderr.write(`lamella: warning: ${message}\n`);
  };
  // Glob patterns are expanded as `lamella series` expands them; anything else is a photo path
  // (a missing file or a folder then fails as that photo, and the other photos go on).
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
  const { stack, angleRad } = stackFromOptions(opts, { onWarning: warn });
  // Check the lights before any photo is read: a bad name is a usage error, not a failed photo.
  lightsFromOptions(opts);
  lineOfLight(opts.light);
  const camera = parseCameraOption(opts.camera);
  const lightField = parseLightFieldOption(opts.lightField);
  const outputs = parseOutputsOption(opts.outputs);
  if (!opts.report) outputs.delete('report');
  const writeReport = outputs.has('report');
  const { thinBelowNm, maxThicknessNm, region, maskPath, anchors, pixelSizeUm, filmArea, expectNm } = filmAreaFromOptions(opts);
  if ((opts.known ?? []).length > 0 && opts.calibration) {
    throw new UsageError('give either --known (calibrate on the photo) or --calibration (a calibration file), not both');
  }
  const calibration = opts.calibration
    ? await loadCalibrationForRun(opts.calibration, {
        stack: opts.stack ?? '',
        light: opts.light,
        angleRad,
        whiteBalanceLight: opts.whiteBalance ?? null,
        camera,
        ignoreMismatch: opts.ignoreCalibrationMismatch === true,
      })
    : null;
  const options: MapOptions = {
    stack,
    angleRad,
    light: opts.light,
    whiteBalanceLight: opts.whiteBalance ?? null,
    camera,
    filmIndexScale: calibration?.filmIndexScale ?? undefined,
    thinBelowNm,
    region,
    maskPath,
    anchors,
    maxThicknessNm,
    pixelSizeUm,
    exposureFixed: calibration?.exposureFixed ?? null,
    exposureFieldFixed: calibration?.exposureField
      ? { ...calibration.exposureField, file: opts.calibration!, ignoreSizeMismatch: opts.ignoreCalibrationMismatch === true }
      : null,
    lightField,
    filmArea,
    expectNm,
    ...(opts.threads !== undefined ? { threads: parseThreads(opts.threads) } : {}),
  };
  const known = (opts.known ?? []).map(parseKnown);
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
  // files read above) against every output, by identity, before any work.
  const plannedOutputs = stems.flatMap((stem) => OUTPUT_SUFFIXES.map((suffix) => join(opts.out, stem + suffix))).concat(join(opts.out, 'report.html'));
  const runInputs = [...photos.map((path) => ({ path, role: 'photo' })), ...(opts.mask ? [{ path: opts.mask, role: '--mask' }] : [])];
  assertNoInputOverwritten(runInputs, plannedOutputs);
  // Build the colour table once before any photo: a film, light or angle the model cannot use
  // (e.g. a material outside its wavelength range) is a usage error, not a failed photo.
  if (lineOfLight(options.light) === null) colourTableFor(options);
  const outDirExisted = existsSync(opts.out);
  const outDir = await ensureOutputDir(opts.out, { inputs: runInputs, outputs: plannedOutputs });
  // What a run killed outright (SIGKILL) left here: finish or drop its output set.
  recoverStagedSets(outDir);
  const failed: string[] = [];
  let thin = 0;
  const records: Record<string, unknown>[] = [];
  const reports: Array<{ stem: string; file: string }> = [];
  // On a terminal, the stage each photo is in, on one line rewritten in place (never on a pipe).
  const showPhases = process.stderr.isTTY === true && !opts.quiet;
  const clearPhase = (): void => void (showPhases && process.stderr.write('\r\x1b[K'));
  for (const [index, photo] of photos.entries()) {
    const stem = stems[index];
    const showPhase = (phase: keyof typeof PHASE_WORDS): void => {
      if (showPhases) process.stderr.write(`\r\x1b[Klamella: ${photo}${photos.length > 1 ? ` (${index + 1}/${photos.length})` : ''}: ${PHASE_WORDS[phase]}…`);
    };
    try {
      showPhase('decode');
      const decoded = await readPhoto(photo, { maxPixels: MAP_MAX_PIXELS, allowDamaged: opts.allowDamaged === true });
      for (const warning of decoded.warnings ?? []) warn(`${photo}: ${warning}`);
      const mask = options.maskPath ? await readMask(options.maskPath, decoded.width, decoded.height) : null;
      let photoOptions = options;
      if (known.length > 0) {
        const onPhoto = calibrateDecoded(decoded.rgb, decoded.width, decoded.height, basename(photo), {
          stack,
          stackSpec: opts.stack ?? '',
          light: opts.light,
          whiteBalanceLight: opts.whiteBalance ?? null,
          camera,
          angleRad,
          known,
          fit: ['exposure', 'flare', 'white-balance', 'response'],
          lightField,
        });
        const onPhotoFitted = onPhoto.fitted as { exposure: number; white_balance: [number, number, number]; flare: [number, number, number]; response: CameraResponse | null };
        const fitted = { exposure: onPhotoFitted.exposure, whiteBalance: onPhotoFitted.white_balance, flare: onPhotoFitted.flare, response: onPhotoFitted.response };
        const field = (onPhoto.exposure_field as { log_gain_coefficients: number[] | null }).log_gain_coefficients;
        photoOptions = {
          ...options,
          exposureFixed: { ...fitted, responseSource: fitted.response ? 'calibration' : 'identity' },
          exposureFieldFixed: field ? { logGainCoefficients: field, widthPx: decoded.width, heightPx: decoded.height, file: photo, ignoreSizeMismatch: false } : null,
        };
        for (const warning of onPhoto.warnings) warn(`${photo}: calibration: ${warning}`);
      }
      const result = mapDecodedPhoto(decoded, { ...photoOptions, onPhase: showPhases ? showPhase : null }, mask, photo);
      showPhase('outputs');
      // Which Lamella made it, from which files (SHA-256 of the photo, mask and data files read).
      const record = {
        ...mapResultJson(result, photoOptions, photo),
        provenance: await provenanceOf([{ path: photo, role: 'photo' }, ...(opts.mask ? [{ path: opts.mask, role: '--mask' }] : []), ...notedInputFiles()]),
      };
      // The photo's new outputs replace its old ones all together or not at all, even when
      // interrupted or the disk fills up (with one photo, report.html belongs to the set).
      const setNames = OUTPUT_SUFFIXES.map((suffix) => stem + suffix).concat(photos.length === 1 ? ['report.html'] : []);
      await writeOutputSet(setNames.map((name) => join(outDir, name)), async (staging) => {
        const selection = {
          npy: outputs.has('npy'), tiff: outputs.has('tif'), confidence: outputs.has('confidence'), status: outputs.has('status'),
          images: false, map: outputs.has('map'), flags: outputs.has('flags'), json: outputs.has('json'),
        };
        await writeMapOutputs(result, photo, staging, stem, selection, photoOptions, record);
        if (writeReport) {
          const html = renderMapReport({ ...(await mapReportInput(result, photoOptions, photo, record)), calibration: calibration?.raw ?? null });
          await atomicWriteFile(join(staging, `${stem}.report.html`), Buffer.from(html, 'utf8'));
          if (photos.length === 1) await atomicWriteFile(join(staging, 'report.html'), Buffer.from(html, 'utf8'));
        }
      });
      if (writeReport) reports.push({ stem, file: `${stem}.report.html` });
      records.push(record);
      // Thin regions lie in the film only; a photo without film has none to report.
      if (result.thinRegions.length > 0 && result.filmArea?.found !== false) thin++;
      clearPhase();
      for (const warning of result.warnings) warn(`${photo}: ${warning}`);
      if (!opts.json && !opts.quiet) process.stdout.write(`${summaryLine(photo, result)}\n`);
    } catch (error) {
      clearPhase();
      // A calibration's light field made for another photo size holds for the whole run (exit 2).
      if (error instanceof FieldSizeMismatchError) throw error;
      failed.push(photo);
      process.stderr.write(`lamella: ${oneLine(error).startsWith(photo) ? '' : `${photo}: `}${oneLine(error)}\n`);
    }
  }
  if (writeReport && photos.length > 1 && reports.length > 0) {
    await atomicWriteFile(join(outDir, 'report.html'), Buffer.from(mapIndexPage(reports), 'utf8'));
  }
  // One shape for one photo or many: an array of records (README, "--json").
  if (opts.json) process.stdout.write(`${JSON.stringify(records, null, 2)}\n`);
  // A folder this run made and filled with nothing (every photo failed) is not left behind.
  if (records.length === 0 && !outDirExisted) removeIfEmpty(outDir);
  if (failed.length > 0) {
    // With several photos, the names again at the end, where the user of a long batch looks.
    const names = failed.length <= 10 ? failed.join(', ') : `${failed.slice(0, 10).join(', ')} and ${failed.length - 10} more`;
    process.stderr.write(`lamella: ${failed.length} of ${photos.length} photo(s) failed${photos.length > 1 ? `: ${names}` : ''}\n`);
    return EXIT_INPUT;
  }
  if (opts.failIfThin && thin > 0) return EXIT_FINDING;
  return 0;
}

export function summaryLine(photo: string, result: Pick<MapResult, 'stats' | 'thinRegions' | 'fitted' | 'filmArea' | 'exposureField'>): string {
  // The warning itself comes from the mapper; the line only says there is nothing to summarise.
  if (result.filmArea && !result.filmArea.found) return `${photo}: no film found in this photo (no statistics, no thin regions)`;
  const s = result.stats;
  const f = (v: number | null, d = 1): string => (v === null ? '–' : v.toFixed(d));
  const thin = s.thin_fraction === null ? '' : `, thin ${f(s.thin_fraction * 100)} %`;
  const field = result.exposureField
    ? ` over uneven light (${result.exposureField.source === 'calibration' ? "calibration's" : 'fitted'} field ${result.exposureField.gainMin.toFixed(2)}–${result.exposureField.gainMax.toFixed(2)})`
    : '';
  const film = result.filmArea && result.filmArea.mode === 'auto' ? `, film ${f(result.filmArea.fraction * 100)} % of the photo` : '';
  const response = result.fitted.response;
  const style = response && isStrongResponse(response) ? `, picture style ${result.fitted.responseSource === 'calibration' ? 'from the calibration' : 'fitted'} (${describeResponse(response)})` : '';
  return `${photo}: median ${f(s.median_nm)} nm (p05 ${f(s.p05_nm)}, p95 ${f(s.p95_nm)})${film}, coverage ${f(s.coverage * 100)} %${thin}, ${result.thinRegions.length} thin region(s), exposure ×${result.fitted.exposure.toFixed(2)}${field}${style}`;
}

function removeIfEmpty(dir: string): void {
  try {
    if (readdirSync(dir).length === 0) rmdirSync(dir);
  } catch {
    // Left as it is: a folder that cannot be listed or removed is not worth a second error.
  }
}

function parseThreads(value: string): number {
  const n = parseDecimal(value);
  if (!(Number.isInteger(n) && n >= 1 && n <= 64)) throw new UsageError(`--threads must be a whole number from 1 to 64, received ${value}`);
  return n;
}
