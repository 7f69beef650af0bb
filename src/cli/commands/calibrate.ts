/**
 * `lamella calibrate PHOTO --stack S --light L --known X,Y,W,H=NM … --out CAL.json`: fits the
 * photo-formation parameters (and on request film index and angle) from rectangles of known
 * thickness, writes them with uncertainties to a file `map` and `series` take with --calibration.
 */
import { describeResponse } from '../../colour/toneResponse.js';
import { CAMERA_HELP, parseCameraOption } from '../cameraOption.js';
import { LIGHT_FIELD_HELP, parseLightFieldOption } from '../lightFieldOption.js';
import type { Command } from 'commander';
import { atomicWriteFile } from '../../io/atomicWriteFile.js';
import { calibrate } from '../../api/calibrate.js';
import { CALIBRATION_PARAMETERS, DEFAULT_CALIBRATION_FIT, type CalibrationParameter } from '../../calibrate/fitCalibration.js';
import { UsageError } from '../errors.js';
import { checkOutputFile } from '../outputFile.js';
import { collect, parseKnown } from '../parseGeometry.js';
import { addStackOptions, stackFromOptions, type StackCliOptions } from '../stackOptions.js';
import { addLightOptions, lightsFromOptions } from '../lightOptions.js';

interface CalibrateCliOptions extends StackCliOptions {
  light: string;
  whiteBalance?: string;
  camera?: string;
  known?: string[];
  fit: string;
  out: string;
  json?: boolean;
  force?: boolean;
  lightField?: string;
}

export function parseFitList(text: string): CalibrationParameter[] {
  const names = text.split(',').map((s) => s.trim()).filter(Boolean);
  for (const name of names) {
    if (!(CALIBRATION_PARAMETERS as readonly string[]).includes(name)) {
      throw new UsageError(`--fit: unknown parameter '${name}'; choose from ${CALIBRATION_PARAMETERS.join(', ')}`);
    }
  }
  if (names.length === 0) throw new UsageError(`--fit needs at least one of ${CALIBRATION_PARAMETERS.join(', ')}`);
  return names as CalibrationParameter[];
}

export function register(program: Command): void {
  const command = program
    .command('calibrate')
    .description("fit exposure, flare, white balance and the camera's picture style (optionally film index and angle) from regions of known thickness; writes a calibration file")
    .argument('<photo>', 'photo of a reference sample (e.g. a step wafer with measured patches)');
  addLightOptions(addStackOptions(command), { required: false })
    .option('--camera <mode-or-file>', CAMERA_HELP)
    .option('--known <x,y,w,h=nm>', 'a rectangle of known film thickness (repeatable, at least one)', collect)
    .option('--light-field <mode>', `${LIGHT_FIELD_HELP}; fitted on the known regions when they are 4 or more spread over at least half the photo's width and height, and stored for \`map --calibration\` (same photo size)`, 'auto')
    .option('--fit <list>', `parameters to fit, from ${CALIBRATION_PARAMETERS.join(',')} (response: the camera's tone curve and saturation, fitted from 4 or more known thicknesses)`, DEFAULT_CALIBRATION_FIT.join(','))
    .requiredOption('--out <file>', 'calibration file to write (JSON)')
    .option('--force', 'overwrite an existing calibration file')
    .option('--json', 'print the calibration record on stdout')
    .action(async (photo: string, opts: CalibrateCliOptions) => {
      const { stack, angleRad } = stackFromOptions(opts);
      lightsFromOptions(opts);
      const camera = parseCameraOption(opts.camera);
      const lightField = parseLightFieldOption(opts.lightField);
      const known = (opts.known ?? []).map(parseKnown);
      if (known.length === 0) throw new UsageError('--known is required at least once: X,Y,W,H=NM (a rectangle of known thickness)');
      await checkOutputFile(opts.out, { force: opts.force === true, inputs: [photo], example: 'cal.json' });
      const record = await calibrate(photo, {
        stack,
        stackSpec: opts.stack ?? '',
        light: opts.light,
        whiteBalanceLight: opts.whiteBalance ?? null,
        camera,
        angleRad,
        known: known.map((k) => ({ region: k.region, thicknessNm: k.thicknessNm })),
        fit: parseFitList(opts.fit),
        lightField,
      });
      await atomicWriteFile(opts.out, Buffer.from(`${JSON.stringify(record, null, 2)}\n`, 'utf8'));
      for (const warning of record.warnings) process.stderr.write(`lamella: warning: ${warning}\n`);
      if (opts.json) process.stdout.write(`${JSON.stringify(record, null, 2)}\n`);
      else process.stdout.write(summary(record, opts.out));
    });
}

function lightFieldLine(field: { relative_gain_min?: number; relative_gain_max?: number; fitted_terms?: string; note: string }): string {
  if (field.relative_gain_min === undefined || field.relative_gain_max === undefined) return field.note;
  return `${field.fitted_terms}, relative gain ${field.relative_gain_min.toFixed(3)}–${field.relative_gain_max.toFixed(3)} over the photo (${field.note})`;
}

function summary(record: Record<string, unknown>, out: string): string {
  const fitted = record.fitted as {
    exposure: number;
    white_balance: number[];
    flare: number[];
    film_index_scale: number;
    angle_deg: number;
    response?: { contrast: number; gamma: number; saturation: number } | null;
  };
  const u = record.uncertainty as Record<string, number | null>;
  const pm = (key: string): string => (u[key] == null ? '' : ` ± ${(u[key] as number).toPrecision(2)}`);
  const lines = [
    `calibration written to ${out}`,
    `  exposure       ${fitted.exposure.toFixed(4)}${pm('exposure')}`,
    `  white balance  R ${fitted.white_balance[0].toFixed(4)}${pm('wb_r')}, G 1, B ${fitted.white_balance[2].toFixed(4)}${pm('wb_b')}`,
    `  flare          ${fitted.flare.map((f) => f.toFixed(4)).join(', ')}`,
    `  index scale    ${fitted.film_index_scale.toFixed(4)}${pm('index_scale')}`,
    `  angle          ${fitted.angle_deg.toFixed(2)}°${pm('angle_deg')}`,
    `  picture style  ${fitted.response ? describeResponse(fitted.response) : `none (identity)${typeof record.response_note === 'string' ? `: ${record.response_note}` : ''}`}`,
    `  light field    ${lightFieldLine(record.exposure_field as { relative_gain_min?: number; relative_gain_max?: number; fitted_terms?: string; note: string })}`,
    ...(record.known_regions as Array<{ region_px: number[]; thickness_nm: number; residual_delta_e2000: number }>).map(
      (k) => `  known ${k.region_px.join(',')} = ${k.thickness_nm} nm: residual ΔE2000 ${k.residual_delta_e2000.toFixed(2)}`,
    ),
  ];
  return `${lines.join('\n')}\n`;
}
