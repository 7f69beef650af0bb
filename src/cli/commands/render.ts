/**
 * `lamella render`: a thickness map (.npy, float TIFF, or 16-bit PNG with --png-scale) → the photo
 * a camera would take of the film (8-bit sRGB PNG/JPEG, or 16-bit PNG/TIFF), through the shared
 * photo model: exposure, flare, white balance, Gaussian noise. Written atomically; the input is
 * never overwritten.
 */
import { isCameraFile } from '../../colour/cameraSpec.js';
import { extname } from 'node:path';
import type { Command } from 'commander';
import { Option } from 'commander';
import type { ObserverName } from '../../colour/observers.js';
import { CsvFormatError } from '../../colour/readNumericCsv.js';
import { assertNoInputOverwritten } from '../../io/ensureOutputDir.js';
import { imageFormatFromPath, writeImage } from '../../io/writeImage.js';
import { checkOutputFile } from '../outputFile.js';
import { DataFileError } from '../../optics/dataFileError.js';
import type { Polarisation } from '../../optics/types.js';
import { render } from '../../api/render.js';
import { InputError, UsageError } from '../errors.js';
import { addStackOptions, parseNumberOption, stackFromOptions, type StackCliOptions } from '../stackOptions.js';
import { addLightOptions, lightsFromOptions } from '../lightOptions.js';

interface RenderCliOptions extends StackCliOptions {
  light: string;
  whiteBalance?: string;
  camera?: string;
  observer: ObserverName;
  polarisation: Polarisation;
  exposure: string;
  flare: string;
  noise: string;
  seed: string;
  quality: string;
  bitDepth?: '8' | '16';
  pngScale?: string;
  out: string;
  force?: boolean;
}

function parseFlare(text: string): number | [number, number, number] {
  const parts = text.split(',').map((part) => part.trim());
  const values = parts.map(Number);
  if ((parts.length !== 1 && parts.length !== 3) || parts.some((p) => p === '') || values.some((v) => !Number.isFinite(v) || Math.abs(v) >= 1)) {
    throw new UsageError(`--flare must be one number or three comma-separated numbers (linear units, |flare| < 1), received ${JSON.stringify(text)}`);
  }
  return values.length === 1 ? values[0] : [values[0], values[1], values[2]];
}

async function run(file: string, opts: RenderCliOptions): Promise<void> {
  assertNoInputOverwritten([file, ...(isCameraFile(opts.camera) ? [opts.camera as string] : [])], [opts.out]);
  const format = imageFormatFromPath(opts.out);
  if (!format) throw new UsageError(`--out must end in .png, .jpg/.jpeg or .tif/.tiff, received ${JSON.stringify(opts.out)} (extension ${JSON.stringify(extname(opts.out))})`);
  await checkOutputFile(opts.out, { force: opts.force === true, inputs: [file, ...(isCameraFile(opts.camera) ? [opts.camera as string] : [])], example: 'photo.jpg' });
  const bitDepth = opts.bitDepth ? (Number(opts.bitDepth) as 8 | 16) : format === 'tiff' ? 16 : 8;
  if (format === 'jpeg' && bitDepth === 16) throw new UsageError('--bit-depth 16 needs a .png or .tif output; JPEG is 8-bit');
  const exposure = parseNumberOption(opts.exposure, '--exposure', 'a gain > 0');
  if (exposure <= 0) throw new UsageError(`--exposure must be a gain > 0, received ${exposure}`);
  const flare = parseFlare(opts.flare);
  const noiseSigma = parseNumberOption(opts.noise, '--noise', 'a standard deviation >= 0 in linear units');
  if (noiseSigma < 0) throw new UsageError(`--noise must be a standard deviation >= 0 in linear units, received ${noiseSigma}`);
  const seed = parseNumberOption(opts.seed, '--seed', 'an integer');
  if (!Number.isInteger(seed)) throw new UsageError(`--seed must be an integer, received ${seed}`);
  const quality = parseNumberOption(opts.quality, '--quality', 'an integer from 1 to 100');
  if (!Number.isInteger(quality) || quality < 1 || quality > 100) throw new UsageError(`--quality must be an integer from 1 to 100, received ${quality}`);
  const pngScaleNm = opts.pngScale === undefined ? undefined : parseNumberOption(opts.pngScale, '--png-scale', 'nm per count > 0');
  if (pngScaleNm !== undefined && pngScaleNm <= 0) throw new UsageError(`--png-scale must be nm per count > 0, received ${pngScaleNm}`);

  const { light, whiteBalance: whiteBalanceLight } = lightsFromOptions(opts);
  const { stack, angleRad } = stackFromOptions(opts, { onWarning: (message) => process.stderr.write(`lamella: warning: ${message}\n`) });
  // The stack, material and SPD files were read after the first check: none may be --out.
  assertNoInputOverwritten([], [opts.out]);
  let result;
  try {
    result = await render(file, {
      stack, light, angleRad, polarisation: opts.polarisation, observer: opts.observer, whiteBalanceLight, camera: opts.camera,
      exposure, flare, noiseSigma, seed, bitDepth, pngScaleNm,
    });
  } catch (error) {
    if (error instanceof DataFileError) throw new InputError(error.file, error.detail);
    if (error instanceof CsvFormatError) throw new InputError(error.file, error.message.slice(error.file.length).replace(/^[,:]\s*/, ''));
    throw error;
  }
  for (const warning of result.warnings) process.stderr.write(`lamella: warning: ${file}: ${warning}\n`);
  await writeImage(opts.out, { data: result.data, width: result.width, height: result.height, channels: 3 }, { quality });
}

export function register(program: Command): void {
  const command = program
    .command('render')
    .argument('<thickness-file>', 'thickness map in nm: .npy (float), 32-bit float TIFF, or 16-bit PNG/TIFF with --png-scale')
    .description('render a thickness map into the photo a camera would take of the film (synthetic test images, demos)');
  addLightOptions(addStackOptions(command), { required: true })
    .requiredOption('--out <photo>', 'output photo: .png or .jpg (8-bit sRGB), .tif (16-bit); written atomically')
    .option('--force', 'replace an existing --out file')
    .option('--camera <mode-or-file>', 'srgb (default), linear (sRGB primaries, values proportional to light) or a raw camera\'s spectral sensitivities CSV (wavelength_nm,r,g,b); a linear camera writes 16-bit linear output')
    .addOption(new Option('--observer <year>', 'CIE standard observer of the sRGB camera').choices(['1931', '1964']).default('1931'))
    .addOption(new Option('--polarisation <mode>', 'polarisation of the light').choices(['s', 'p', 'mixed']).default('mixed'))
    .option('--exposure <gain>', 'exposure gain on linear values (1: a perfect white reflector is full scale)', '1')
    .option('--flare <f|r,g,b>', 'additive flare in linear units, one value or per channel', '0')
    .option('--noise <sigma>', 'Gaussian sensor noise, standard deviation in linear units', '0')
    .option('--seed <n>', 'seed of the noise generator (same seed, same image)', '1')
    .option('--quality <q>', 'JPEG quality 1–100', '92')
    .addOption(new Option('--bit-depth <bits>', 'bits per channel (default 8 for PNG/JPEG, 16 for TIFF)').choices(['8', '16']))
    .option('--png-scale <nm>', 'nm per count of a 16-bit PNG/TIFF thickness map')
    .action((file: string, opts: RenderCliOptions) => run(file, opts));
}
