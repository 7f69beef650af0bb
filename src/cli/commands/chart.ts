/**
 * `lamella chart`: the interference colours of a film over a thickness range, as a CSV or JSON
 * table (thickness_nm, X, Y, Z under the light; L, a, b of the camera colour relative to D65;
 * 8-bit sRGB and #rrggbb; interference order) or as a PNG chart to hold next to a sample.
 */
import { Option, type Command } from 'commander';
import type { ObserverName } from '../../colour/observers.js';
import { atomicWriteFile } from '../../io/atomicWriteFile.js';
import { assertNoInputOverwritten } from '../../io/ensureOutputDir.js';
import { rasteriseSvg } from '../../io/rasteriseSvg.js';
import { DataFileError } from '../../optics/dataFileError.js';
import type { Polarisation } from '../../optics/types.js';
import { chartSvg } from '../../render/chartSvg.js';
import { chartTable, DEFAULT_CHART_RANGE, type ChartTable } from '../../render/chartTable.js';
import { InputError, UsageError } from '../errors.js';
import { addLightOptions, lightsFromOptions } from '../lightOptions.js';
import { addStackOptions, parseNumberOption, stackFromOptions, type StackCliOptions } from '../stackOptions.js';
import { checkOutputFile } from '../outputFile.js';
import { LAMELLA_VERSION } from '../../version.js';

/** Version of the `chart --format json` record (schemas/chart.schema.json). */
export const CHART_SCHEMA_VERSION = 1;

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
  format: 'csv' | 'json' | 'png';
  out?: string;
  force?: boolean;
}

function number(value: number, digits: number): string {
  const text = value.toFixed(digits);
  return /^-0\.?0*$/.test(text) ? text.slice(1) : text;
}

export function chartCsv(table: ChartTable): string {
  const lines = ['thickness_nm,X,Y,Z,L,a,b,r8,g8,b8,hex,order'];
  const { xyz, lab, srgb8 } = table;
  for (let i = 0; i < table.thicknessesNm.length; i++) {
    const k = i * 3;
    const hex = `#${[srgb8[k], srgb8[k + 1], srgb8[k + 2]].map((v) => v.toString(16).padStart(2, '0')).join('')}`;
    lines.push(
      [
        String(Number(table.thicknessesNm[i].toFixed(6))),
        number(xyz[k], 4), number(xyz[k + 1], 4), number(xyz[k + 2], 4),
        number(lab[k], 3), number(lab[k + 1], 3), number(lab[k + 2], 3),
        srgb8[k], srgb8[k + 1], srgb8[k + 2], hex, table.order[i],
      ].join(','),
    );
  }
  return `${lines.join('\n')}\n`;
}

async function run(opts: ChartCliOptions): Promise<void> {
  const fromNm = parseNumberOption(opts.from, '--from', 'a thickness in nm >= 0');
  const toNm = parseNumberOption(opts.to, '--to', 'a thickness in nm');
  const stepNm = parseNumberOption(opts.step, '--step', 'a thickness step in nm > 0');
  // `--out -` is standard output (also for png, when asked for by name).
  const out = opts.out === '-' ? undefined : opts.out;
  if (opts.format === 'png' && opts.out === undefined) throw new UsageError('--format png needs --out FILE.png (or --out - for standard output)');
  opts = { ...opts, out };
  if (opts.out) await checkOutputFile(opts.out, { force: opts.force === true, inputs: [], example: `chart.${opts.format}` });
  const resolution = parseNumberOption(opts.resolution, '--resolution', 'a pixel-density factor from 1 to 4');
  if (resolution < 1 || resolution > 4) throw new UsageError(`--resolution must be a pixel-density factor from 1 to 4, received ${resolution}`);
  const exposure = opts.exposure === 'auto' ? 'auto' : parseNumberOption(opts.exposure, '--exposure', "a gain > 0 or 'auto'");
  if (exposure !== 'auto' && exposure <= 0) throw new UsageError(`--exposure must be a gain > 0 or 'auto', received ${exposure}`);
  const { light, whiteBalance } = lightsFromOptions(opts);
  const { stack, angleRad } = stackFromOptions(opts, { onWarning: (message) => process.stderr.write(`lamella: warning: ${message}\n`) });
  // The stack, material and SPD files were read after the first check: none may be --out.
  if (opts.out) assertNoInputOverwritten([], [opts.out]);
  let table: ChartTable;
  try {
    table = chartTable({ stack, light, angleRad, observer: opts.observer, polarisation: opts.polarisation, whiteBalance, fromNm, toNm, stepNm, exposure });
  } catch (error) {
    if (error instanceof DataFileError) throw new InputError(error.file, error.detail);
    if (error instanceof RangeError && /^(fromNm|toNm|stepNm|thickness range)/.test(error.message)) throw new UsageError(`--from/--to/--step: ${error.message}`);
    throw error;
  }
  const angleDeg = (angleRad * 180) / Math.PI;
  const film = stack.layers.find((layer) => layer.thicknessNm === 'film');
  const settings = {
    stack: stack.name,
    film: film?.material.name ?? null,
    ambient: stack.ambient.name,
    substrate: stack.substrate.name,
    light: light.name,
    light_description: light.description,
    white_balance: whiteBalance?.name ?? light.name,
    angle_deg: angleDeg,
    polarisation: opts.polarisation,
    observer: opts.observer,
    exposure: table.exposure,
    lab_white: 'D65 (sRGB white, Y = 100), after Bradford adaptation from the white-balance light',
    order_rule: 'an order begins at each local minimum of the luminance Y',
  };
  let bytes: Uint8Array;
  if (opts.format === 'csv') bytes = Buffer.from(chartCsv(table), 'utf8');
  else if (opts.format === 'json') {
    const rows = Array.from(table.thicknessesNm, (thicknessNm, i) => {
      const k = i * 3;
      const [r8, g8, b8] = [table.srgb8[k], table.srgb8[k + 1], table.srgb8[k + 2]];
      return {
        thickness_nm: thicknessNm,
        // CIE XYZ (Y = 100 for the white), CIELAB L*, a*, b*, and the 8-bit sRGB code values.
        xyz: [table.xyz[k], table.xyz[k + 1], table.xyz[k + 2]],
        lab: [table.lab[k], table.lab[k + 1], table.lab[k + 2]],
        srgb_8bit: [r8, g8, b8],
        hex: `#${[r8, g8, b8].map((v) => v.toString(16).padStart(2, '0')).join('')}`,
        order: table.order[i],
      };
    });
    bytes = Buffer.from(`${JSON.stringify({ schema_version: CHART_SCHEMA_VERSION, lamella_version: LAMELLA_VERSION, ...settings, order_boundaries_nm: table.boundariesNm, rows }, null, 1)}\n`, 'utf8');
  } else {
    const svg = chartSvg(table, {
      title: `Interference colours: ${stack.name}`,
      details: [
        `film ${settings.film ?? '?'} between ${stack.ambient.name} and ${stack.substrate.name} · ${formatNumber(fromNm)}–${formatNumber(toNm)} nm`,
        `light ${light.name} (${light.description}) · angle of incidence ${formatNumber(angleDeg)}° · ${opts.polarisation} polarisation`,
        `CIE ${opts.observer} observer · camera white-balanced to ${settings.white_balance} · exposure ×${formatNumber(table.exposure)} · sRGB display`,
      ],
    });
    bytes = await rasteriseSvg(svg, { density: 72 * resolution });
  }
  if (opts.out) await atomicWriteFile(opts.out, bytes);
  else process.stdout.write(bytes);
}

function formatNumber(value: number): string {
  return String(Number(value.toFixed(3)));
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
