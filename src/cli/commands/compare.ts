/**
 * `lamella compare BEFORE AFTER --out DIR`: the change between two thickness maps (or two photos
 * mapped with the same settings): after − before in nm, a rate with `--duration S`, a known
 * offset with `--shift DX,DY`. Parsing and printing only; the work is `compareMaps` (src/api).
 */
import type { Command } from 'commander';
import { extname } from 'node:path';
import { compareMaps } from '../../api/compareMaps.js';
import { parseShift } from '../../inspect/compareMaps.js';
import { lineOfLight } from '../../map/mapPhoto.js';
import type { MapOptions } from '../../map/types.js';
import { CAMERA_HELP, parseCameraOption } from '../cameraOption.js';
import { UsageError } from '../errors.js';
import { addFilmAreaOptions, filmAreaFromOptions, type FilmAreaCliOptions } from '../filmAreaOptions.js';
import { addLightOptions, lightsFromOptions } from '../lightOptions.js';
import { parseNumberOption, stackFromOptions, type StackCliOptions } from '../stackOptions.js';
import { listStackPresetNames } from '../../optics/index.js';

interface CompareCliOptions extends Partial<StackCliOptions>, FilmAreaCliOptions {
  out: string;
  duration?: string;
  shift?: string;
  light: string;
  whiteBalance?: string;
  camera?: string;
  json?: boolean;
  quiet?: boolean;
}

export function register(program: Command): void {
  const command = program
    .command('compare')
    .description('change between two thickness maps (.npy or float .tif of the same size) or two photos mapped with the same settings: after − before in nm, a rate with --duration; writes difference.npy/.tif/.png, compare.json and report.html')
    .argument('<before>', 'the map (or photo) before')
    .argument('<after>', 'the map (or photo) after')
    .requiredOption('--out <dir>', 'output folder (created if missing)')
    .option('--duration <s>', 'time between the two, seconds: also a rate map in nm/min (rate.npy)')
    .option('--shift <dx,dy>', 'known offset of AFTER against BEFORE in whole pixels: the point (x, y) of BEFORE is (x+DX, y+DY) in AFTER')
    .option('--stack <preset|file>', `to map photos: the film stack (${listStackPresetNames().join(', ')}) or a stack JSON file`)
    .option('--film-index <material|number>', 'to map photos: film material instead of the stack\'s')
    .option('--angle <deg>', 'to map photos: angle of incidence in the ambient, degrees', '0')
    .option('--extrapolate', 'to map photos: allow materials outside their valid wavelength range');
  addFilmAreaOptions(addLightOptions(command, { required: false }), 'photo')
    .option('--camera <mode-or-file>', CAMERA_HELP)
    .option('--json', 'print the JSON record on stdout')
    .option('--quiet', 'print nothing but errors')
    .action(async (before: string, after: string, opts: CompareCliOptions) => {
      process.exitCode = await runCompare(before, after, opts);
    });
}

const MAP_FILE = /\.(npy|tiff?)$/i;

async function runCompare(before: string, after: string, opts: CompareCliOptions): Promise<number> {
  const warn = (message: string): void => {
    if (!opts.quiet) process.stderr.write(`lamella: warning: ${message}\n`);
  };
  const durationS = opts.duration !== undefined ? parseNumberOption(opts.duration, '--duration', 'a number of seconds > 0') : null;
  if (durationS !== null && !(durationS > 0)) throw new UsageError(`--duration must be a number of seconds > 0, received ${opts.duration}`);
  const shiftPx = opts.shift !== undefined ? parseShift(opts.shift) : ([0, 0] as [number, number]);
  const photos = [before, after].filter((p) => !MAP_FILE.test(extname(p)));
  let map: MapOptions | null = null;
  if (opts.stack !== undefined) {
    const { stack, angleRad } = stackFromOptions(opts as StackCliOptions, { onWarning: warn });
    lightsFromOptions(opts);
    lineOfLight(opts.light);
    const f = filmAreaFromOptions(opts);
    map = {
      stack, angleRad, light: opts.light, whiteBalanceLight: opts.whiteBalance ?? null, camera: parseCameraOption(opts.camera),
      thinBelowNm: f.thinBelowNm, maxThicknessNm: f.maxThicknessNm, region: f.region, maskPath: f.maskPath, anchors: f.anchors,
      pixelSizeUm: f.pixelSizeUm, filmArea: f.filmArea, expectNm: f.expectNm,
    };
  } else if (photos.length > 0) {
    throw new UsageError(`compare: ${photos.join(' and ')} ${photos.length > 1 ? 'are photos' : 'is a photo'}; give --stack (and --light) to map ${photos.length > 1 ? 'them' : 'it'}, or compare two maps (.npy or float .tif)`);
  }
  const { comparison: c, record } = await compareMaps(before, after, { outDir: opts.out, durationS, shiftPx, map, onWarning: warn });
  if (opts.json) process.stdout.write(`${JSON.stringify(record, null, 2)}\n`);
  else if (!opts.quiet) {
    const f = (v: number | null, d = 1): string => (v === null ? '–' : v.toFixed(d));
    const u = c.uniformity.range_over_twice_mean;
    const rate = c.rateStatistics ? `, rate ${f(c.rateStatistics.mean_nm, 2)} nm/min (p05 ${f(c.rateStatistics.p05_nm, 2)}, p95 ${f(c.rateStatistics.p95_nm, 2)})` : '';
    process.stdout.write(`${after} − ${before}: mean ${f(c.statistics.mean_nm)} nm (p05 ${f(c.statistics.p05_nm)}, p95 ${f(c.statistics.p95_nm)}) over ${c.comparedPx} px${rate}, uniformity ±${u === null ? '–' : (u * 100).toFixed(2)} % (max-min)/(2*mean) of the amount ${c.change === 'removed' ? 'removed' : 'added'}\n`);
  }
  return 0;
}
