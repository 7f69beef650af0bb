/**
 * The options that say what part of a photo is film and how to read it, shared by `lamella map`
 * and `lamella series` (one declaration, one parser, the same defaults and messages):
 * `--thin-below`, `--max-thickness`, `--region` | `--mask`, `--anchor` (repeatable), `--pixel-size`,
 * `--film-area auto|whole` (find the film inside region/mask, or take all of it) and
 * `--expect MIN-MAX` (the thickness range the film is known to lie in, nm).
 */
import { Option, type Command } from 'commander';
import type { Anchor, FilmAreaMode } from '../map/types.js';
import { UsageError } from './errors.js';
import { collect, parseAnchor, parseRegion } from './parseGeometry.js';
import { parseNumberOption } from './stackOptions.js';
import { DEFAULT_MAX_THICKNESS_NM, defaultThinBelowNm } from '../map/mapDefaults.js';

export interface FilmAreaCliOptions {
  readonly stack?: string;
  thinBelow?: string;
  maxThickness: string;
  region?: string;
  mask?: string;
  anchor?: string[];
  pixelSize?: string;
  filmArea?: string;
  expect?: string;
}

export interface FilmArea {
  /** Default 50 nm for `soap-film` (films below a few tens of nm look black; common practice), else none. */
  readonly thinBelowNm: number | null;
  readonly maxThicknessNm: number;
  readonly region: [number, number, number, number] | null;
  /** As given (not yet checked or resolved). */
  readonly maskPath: string | null;
  readonly anchors: Anchor[];
  readonly pixelSizeUm: number | null;
  /** `auto` (default): find the film inside region/mask; `whole`: all of region/mask is film. */
  readonly filmArea: FilmAreaMode;
  /** `--expect MIN-MAX`: [min, max] nm with 0 ≤ min < max ≤ max thickness, or null. */
  readonly expectNm: [number, number] | null;
}

export const FILM_AREA_MODES: readonly FilmAreaMode[] = ['auto', 'whole'];

/** Declares the options; `scope` words the help for one photo or every frame of a series. */
export function addFilmAreaOptions(command: Command, scope: 'photo' | 'frames'): Command {
  const each = scope === 'frames' ? ' of every frame' : '';
  return command
    .option('--thin-below <nm>', `thin (rupture-risk) threshold in nm for thin regions and the thin fraction${scope === 'frames' ? ' and predicted crossing times' : ''} (default 50 for soap-film, none otherwise)`)
    .option('--max-thickness <nm>', 'largest thickness considered, nm', String(DEFAULT_MAX_THICKNESS_NM))
    .addOption(new Option('--region <x,y,w,h>', `measure only this rectangle${each} (pixels)`).conflicts('mask'))
    .option('--mask <file>', `measure only where this mask image is non-zero${scope === 'frames' ? ' (same size as the frames)' : ''}`)
    .option('--anchor <x,y=nm>', `a pixel of known thickness${scope === 'frames' ? ' in every frame' : ''} (repeatable)`, collect)
    .option('--pixel-size <um>', 'size of one pixel on the sample, micrometres (areas of thin regions, scale bar)')
    .option(
      '--film-area <mode>',
      `which pixels${each} are film: auto = found in the photo (dark surroundings, frames, holders, glints and colours no film gives are left out), ` +
        'whole = every pixel inside --region/--mask (the whole photo without them)',
      'auto',
    )
    .option('--expect <min-max>', 'thickness range the film is known to lie in, nm (e.g. 80-140): orders and the fit keep to it');
}

/** `--film-area`: `auto` or `whole`. */
export function parseFilmAreaMode(text: string | undefined): FilmAreaMode {
  const mode = (text ?? 'auto').trim();
  if (mode === 'auto' || mode === 'whole') return mode;
  throw new UsageError(`--film-area must be auto or whole, received ${JSON.stringify(text)}`);
}

const DECIMAL = String.raw`-?(?:\d+(?:\.\d*)?|\.\d+)`;
const EXPECT_FORM = new RegExp(`^\\s*(${DECIMAL})\\s*[-–]\\s*(${DECIMAL})\\s*(?:nm)?\\s*$`, 'i');

/**
 * `--expect MIN-MAX` in nm (decimal numbers, e.g. `80-140` or `92.5-110`): 0 ≤ MIN < MAX ≤
 * `maxThicknessNm` (the largest thickness the map considers).
 */
export function parseExpect(text: string, maxThicknessNm: number, option = '--expect'): [number, number] {
  const match = EXPECT_FORM.exec(text);
  if (!match) throw new UsageError(`${option} must be MIN-MAX in nm with decimal numbers (e.g. 80-140), received ${JSON.stringify(text)}`);
  const minNm = Number(match[1]);
  const maxNm = Number(match[2]);
  if (minNm < 0 || maxNm < 0) throw new UsageError(`${option} must not be negative (MIN-MAX in nm, 0 <= MIN < MAX), received ${JSON.stringify(text)}`);
  if (!(minNm < maxNm)) throw new UsageError(`${option} MIN must be below MAX (MIN-MAX in nm), received ${JSON.stringify(text)}`);
  if (maxNm > maxThicknessNm) {
    throw new UsageError(`${option} must lie within 0-${maxThicknessNm} nm (--max-thickness), received ${JSON.stringify(text)}`);
  }
  return [minNm, maxNm];
}

/**
 * Smallest `--max-thickness`, nm: the colour table needs a span of thicknesses to fit exposure
 * and to tell orders apart; below this the fit has nothing to work with.
 */
export const MIN_MAX_THICKNESS_NM = 10;

/** Parses the options; bad values are usage errors naming the option. */
export function filmAreaFromOptions(opts: FilmAreaCliOptions): FilmArea {
  const maxThicknessNm = parseNumberOption(opts.maxThickness, '--max-thickness', 'a number of nm > 0');
  if (!(maxThicknessNm >= MIN_MAX_THICKNESS_NM && maxThicknessNm <= 20000)) throw new UsageError(`--max-thickness must be a number of nm from ${MIN_MAX_THICKNESS_NM} to 20000, received ${opts.maxThickness}`);
  const thinBelowNm =
    opts.thinBelow !== undefined ? parseNumberOption(opts.thinBelow, '--thin-below', 'a number of nm >= 0') : defaultThinBelowNm(opts.stack);
  if (thinBelowNm !== null && thinBelowNm < 0) throw new UsageError(`--thin-below must be a number of nm >= 0, received ${opts.thinBelow}`);
  const pixelSizeUm = opts.pixelSize !== undefined ? parseNumberOption(opts.pixelSize, '--pixel-size', 'a number of micrometres > 0') : null;
  if (pixelSizeUm !== null && !(pixelSizeUm > 0 && pixelSizeUm <= 1e6)) throw new UsageError(`--pixel-size must be a number of micrometres > 0 and at most 1e6 (1 m), received ${opts.pixelSize}`);
  const anchors = (opts.anchor ?? []).map(parseAnchor);
  // An anchor the colour table cannot reach would be ignored without a word.
  for (const a of anchors) {
    if (a.thicknessNm > maxThicknessNm) {
      throw new UsageError(`--anchor ${a.x},${a.y}=${a.thicknessNm} lies above --max-thickness ${maxThicknessNm} nm; raise --max-thickness or correct the anchor`);
    }
  }
  return {
    thinBelowNm,
    maxThicknessNm,
    region: opts.region ? parseRegion(opts.region) : null,
    maskPath: opts.mask ?? null,
    anchors,
    pixelSizeUm,
    filmArea: parseFilmAreaMode(opts.filmArea),
    expectNm: opts.expect !== undefined ? parseExpect(opts.expect, maxThicknessNm) : null,
  };
}
