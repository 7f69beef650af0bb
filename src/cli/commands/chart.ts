/**
 * `lamella chart`: the interference colours of a film over a thickness range, as a CSV or JSON
 * table (thickness_nm, X, Y, Z under the light; L, a, b of the camera colour relative to D65;
 * 8-bit sRGB and #rrggbb; interference order) or as a PNG chart to hold next to a sample.
 */
import { Option, type Command } from 'commander';
import type { ObserverName } from '../../colour/observers.js';
import { chart, type ChartFormat } from '../../api/chart.js';
import { atomicWriteFile } from '../../io/atomicWriteFile.js';
import { assertNoInputOverwritten } from '../../io/ensureOutputDir.js';
import { DataFileError } from '../../optics/dataFileError.js';
import type { Polarisation } from '../../optics/types.js';
import { DEFAULT_CHART_RANGE } from '../../render/chartTable.js';
import { InputError, UsageError } from '../errors.js';
import { addLightOptions, lightsFromOptions } from '../lightOptions.js';
import { addStackOptions, parseNumberOption, stackFromOptions, type StackCliOptions } from '../stackOptions.js';
import { checkOutputFile } from '../outputFile.js';

interface ChartCliOptions extends StackCliOptions {
  light: string;
  whiteBalance?: string;
  observer: ObserverName;
  polarisation: Polarisation;
  from: string;
  to: string;
  step: string;
  exposure: string;
  resolution: string;
  format: ChartFormat;
  out?: string;
  force?: boolean;
}

async function run(opts: ChartCliOptions): Promise<void> {
  const fromNm = parseNumberOption(opts.from, '--from', 'a thickness in nm >= 0');
  const toNm = parseNumberOption(opts.to, '--to', 'a thickness in nm');
  const stepNm = parseNumberOption(opts.step, '--step', 'a thickness step in nm > 0');
  // `--out -` is standard output (also for png, when asked for by name).
  const out = opts.out === '-' ? undefined : opts.out;
  if (opts.format === 'png' && opts.out === undefined) throw new UsageError('--format png needs --out FILE.png (or --out - for standard output)');
  if (out) await checkOutputFile(out, { force: opts.force === true, inputs: [], example: `chart.${opts.format}` });
  const resolution = parseNumberOption(opts.resolution, '--resolution', 'a pixel-density factor from 1 to 4');
  if (resolution < 1 || resolution > 4) throw new UsageError(`--resolution must be a pixel-density factor from 1 to 4, received ${resolution}`);
  const exposure = opts.exposure === 'auto' ? 'auto' : parseNumberOption(opts.exposure, '--exposure', "a gain > 0 or 'auto'");
  if (exposure !== 'auto' && exposure <= 0) throw new UsageError(`--exposure must be a gain > 0 or 'auto', received ${exposure}`);
  const { light, whiteBalance } = lightsFromOptions(opts);
  const { stack, angleRad } = stackFromOptions(opts, { onWarning: (message) => process.stderr.write(`lamella: warning: ${message}\n`) });
  // The stack, material and SPD files were read after the first check: none may be --out.
  if (out) assertNoInputOverwritten([], [out]);
  let result;
  try {
    result = await chart({ stack, light, whiteBalance, angleRad, observer: opts.observer, polarisation: opts.polarisation, fromNm, toNm, stepNm, exposure, format: opts.format, resolution });
  } catch (error) {
    if (error instanceof DataFileError) throw new InputError(error.file, error.detail);
    if (error instanceof RangeError && /^(fromNm|toNm|stepNm|thickness range)/.test(error.message)) throw new UsageError(`--from/--to/--step: ${error.message}`);
    throw error;
  }
  if (out) await atomicWriteFile(out, result.bytes);
  else process.stdout.write(result.bytes);
}

export function register(program: Command): void {
  const command = program
    .command('chart')
    .description('interference colours of a film over a thickness range: CSV/JSON table or a PNG chart')
    .addHelpText(
      'after',
      '\nColours are computed, then shown through an sRGB display or print: judge a sample by eye only as an estimate.\n' +
        'Do not base release decisions on a visual chart alone; use qualified metrology (ellipsometry, reflectometry).\n' +
        'Follow local safety codes for UV lamps, lasers and etch or soap chemicals used to prepare samples.',
    );
  addLightOptions(addStackOptions(command), { required: true })
    .addOption(new Option('--observer <year>', 'CIE standard observer').choices(['1931', '1964']).default('1931'))
    .addOption(new Option('--polarisation <mode>', 'polarisation of the light').choices(['s', 'p', 'mixed']).default('mixed'))
    .option('--from <nm>', 'first thickness, nm', String(DEFAULT_CHART_RANGE.fromNm))
    .option('--to <nm>', 'last thickness, nm', String(DEFAULT_CHART_RANGE.toNm))
    .option('--step <nm>', 'thickness step, nm', String(DEFAULT_CHART_RANGE.stepNm))
    .option('--exposure <gain|auto>', "gain on the recorded colours (1: a perfect white reflector is white; 'auto': brightest swatch at full scale)", '1')
    .option('--resolution <factor>', 'PNG pixel density: 1 gives a 1240-pixel-wide chart, 2 or 3 for print', '1')
    .addOption(new Option('--format <kind>', 'output format').choices(['csv', 'json', 'png']).default('csv'))
    .option('--out <file>', "write to this file (written atomically) instead of standard output; '-' is standard output; required for png")
    .option('--force', 'replace an existing --out file')
    .action((opts: ChartCliOptions) => run(opts));
}
