/**
 * `lamella map PHOTO... --stack S --out DIR`: thickness maps from photos. Each photo is mapped
 * and its outputs written atomically; a bad photo is reported and the others go on (exit 3 at
 * the end). `--fail-if-thin` turns a thin region into exit status 1.
 */
import { describeResponse, isStrongResponse } from '../../colour/toneResponse.js';
import { CAMERA_HELP, parseCameraOption } from '../cameraOption.js';
import { OUTPUTS_HELP, parseOutputsOption } from '../outputsOption.js';
import { mapPhotos, type MapPhotosOptions } from '../../api/mapPhotos.js';
import { LIGHT_FIELD_HELP, parseLightFieldOption } from '../lightFieldOption.js';
import type { Command } from 'commander';
import { EXIT_FINDING, EXIT_INPUT, oneLine } from '../errors.js';
import { addStackOptions, stackFromOptions, type StackCliOptions } from '../stackOptions.js';
import { addFilmAreaOptions, filmAreaFromOptions, type FilmAreaCliOptions } from '../filmAreaOptions.js';
import { collect, parseKnown } from '../parseGeometry.js';
import { UsageError } from '../errors.js';
import { parseDecimal } from '../parseDecimal.js';
import { lineOfLight } from '../../map/mapPhoto.js';
import { addLightOptions, lightsFromOptions } from '../lightOptions.js';
import type { MapOptions, MapResult } from '../../map/types.js';
import { addInspectOptions, inspectFromOptions, type InspectCliOptions } from '../inspectOptions.js';
import { inspectionSummaryText, type Inspection } from '../../inspect/inspectMap.js';

interface MapCliOptions extends StackCliOptions, FilmAreaCliOptions, InspectCliOptions {
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
  addInspectOptions(addFilmAreaOptions(addLightOptions(addStackOptions(command), { required: false }), 'photo'), 'photo')
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

/** Checks the options and builds the library call (what to map, and what to write where). */
export function mapJobFromOptions(opts: MapCliOptions, warn: (message: string) => void): MapPhotosOptions {
  const { stack, angleRad } = stackFromOptions(opts, { onWarning: warn });
  // Check the lights before any photo is read: a bad name is a usage error, not a failed photo.
  lightsFromOptions(opts);
  lineOfLight(opts.light);
  const outputs = parseOutputsOption(opts.outputs);
  if (!opts.report) outputs.delete('report');
  const { thinBelowNm, maxThicknessNm, region, maskPath, anchors, pixelSizeUm, filmArea, expectNm } = filmAreaFromOptions(opts);
  const inspect = inspectFromOptions(opts);
  const map: MapOptions = {
    stack, angleRad, light: opts.light, whiteBalanceLight: opts.whiteBalance ?? null, camera: parseCameraOption(opts.camera),
    thinBelowNm, region, maskPath, anchors, maxThicknessNm, pixelSizeUm, lightField: parseLightFieldOption(opts.lightField), filmArea, expectNm,
    ...(opts.threads !== undefined ? { threads: parseThreads(opts.threads) } : {}),
  };
  return {
    map,
    outDir: opts.out,
    outputs,
    known: (opts.known ?? []).map(parseKnown),
    stackSpec: opts.stack ?? '',
    calibrationFile: opts.calibration ?? null,
    ignoreCalibrationMismatch: opts.ignoreCalibrationMismatch === true,
    allowDamaged: opts.allowDamaged === true,
    inspect,
  };
}

async function runMap(inputs: string[], opts: MapCliOptions): Promise<number> {
  const warn = (message: string): void => {
    if (!opts.quiet) process.stderr.write(`lamella: warning: ${message}\n`);
  };
  const job = mapJobFromOptions(opts, warn);
  // On a terminal, the stage each photo is in, on one line rewritten in place (never on a pipe).
  const showPhases = process.stderr.isTTY === true && !opts.quiet;
  const clearPhase = (): void => void (showPhases && process.stderr.write('\r\x1b[K'));
  let count = inputs.length;
  const { photos, records, failed, withThinRegions: thin, outOfSpec } = await mapPhotos(inputs, job, {
    onPhase: showPhases
      ? (photo, index, phase) => process.stderr.write(`\r\x1b[Klamella: ${photo}${count > 1 ? ` (${index + 1}/${count})` : ''}: ${PHASE_WORDS[phase]}…`)
      : undefined,
    onWarning: (message) => {
      clearPhase();
      warn(message);
    },
    onPhoto: (photo, result, _record, inspection) => {
      clearPhase();
      for (const warning of result.warnings) warn(`${photo}: ${warning}`);
      if (!opts.json && !opts.quiet) process.stdout.write(`${summaryLine(photo, result, inspection)}\n`);
    },
    onFailure: (photo, error) => {
      clearPhase();
      process.stderr.write(`lamella: ${oneLine(error).startsWith(photo) ? '' : `${photo}: `}${oneLine(error)}\n`);
    },
    onStart: (batch) => void (count = batch.length),
  });
  // One shape for one photo or many: an array of records (README, "--json").
  if (opts.json) process.stdout.write(`${JSON.stringify(records, null, 2)}\n`);
  if (failed.length > 0) {
    // With several photos, the names again at the end, where the user of a long batch looks.
    const names = failed.length <= 10 ? failed.join(', ') : `${failed.slice(0, 10).join(', ')} and ${failed.length - 10} more`;
    process.stderr.write(`lamella: ${failed.length} of ${photos.length} photo(s) failed${photos.length > 1 ? `: ${names}` : ''}\n`);
    return EXIT_INPUT;
  }
  if (opts.failIfThin && thin > 0) return EXIT_FINDING;
  if (opts.failIfOutOfSpec && outOfSpec > 0) return EXIT_FINDING;
  return 0;
}

export function summaryLine(photo: string, result: Pick<MapResult, 'stats' | 'thinRegions' | 'fitted' | 'filmArea' | 'exposureField'>, inspection: Inspection | null = null): string {
  // The warning itself comes from the mapper; the line only says there is nothing to summarise.
  if (result.filmArea && !result.filmArea.found) {
    return `${photo}: no film found in this photo (no statistics, no thin regions)${inspection?.verdict ? `; spec ${inspection.spec?.spec.text}: FAIL (no film area to inspect)` : ''}`;
  }
  const s = result.stats;
  const f = (v: number | null, d = 1): string => (v === null ? '–' : v.toFixed(d));
  const thin = s.thin_fraction === null ? '' : `, thin ${f(s.thin_fraction * 100)} %`;
  const field = result.exposureField
    ? ` over uneven light (${result.exposureField.source === 'calibration' ? "calibration's" : 'fitted'} field ${result.exposureField.gainMin.toFixed(2)}–${result.exposureField.gainMax.toFixed(2)})`
    : '';
  const film = result.filmArea && result.filmArea.mode === 'auto' ? `, film ${f(result.filmArea.fraction * 100)} % of the photo` : '';
  const response = result.fitted.response;
  const style = response && isStrongResponse(response) ? `, picture style ${result.fitted.responseSource === 'calibration' ? 'from the calibration' : 'fitted'} (${describeResponse(response)})` : '';
  const inspected = inspection ? inspectionSummaryText(inspection) : '';
  return `${photo}: median ${f(s.median_nm)} nm (p05 ${f(s.p05_nm)}, p95 ${f(s.p95_nm)})${film}, coverage ${f(s.coverage * 100)} %${thin}, ${result.thinRegions.length} thin region(s), exposure ×${result.fitted.exposure.toFixed(2)}${field}${style}${inspected ? `; ${inspected}` : ''}`;
}

function parseThreads(value: string): number {
  const n = parseDecimal(value);
  if (!(Number.isInteger(n) && n >= 1 && n <= 64)) throw new UsageError(`--threads must be a whole number from 1 to 64, received ${value}`);
  return n;
}
