/**
 * The coating-inspection options shared by `lamella map` and `lamella series` (issue 19):
 * `--spec`, `--pass-if`, `--fail-if-out-of-spec`, `--edge-exclusion`, `--part-diameter`,
 * `--part-width`, and for `map` also `--points` and `--profile`. Parsing only; the work is in
 * src/inspect.
 */
import type { Command } from 'commander';
import { readFileSync } from 'node:fs';
import type { InspectOptions } from '../inspect/inspectMap.js';
import { parsePointsCsv, parsePolar, parseProfile } from '../inspect/samplePoints.js';
import { DEFAULT_PASS_RULE, parsePassRule, parseSpec } from '../inspect/spec.js';
import { InputError, UsageError } from './errors.js';
import { collect } from './parseGeometry.js';
import { parseNumberOption } from './stackOptions.js';

export interface InspectCliOptions {
  spec?: string;
  passIf?: string;
  failIfOutOfSpec?: boolean;
  edgeExclusion?: string;
  partDiameter?: string;
  partWidth?: string;
  points?: string;
  profile?: string[];
}

export function addInspectOptions(command: Command, scope: 'photo' | 'frames'): Command {
  command
    .option('--spec <nominal±tol|min-max>', 'thickness specification in nm, e.g. 100±5, 100+-5, 100±5% or 95-105: share in spec and a pass/fail verdict (also keeps the order search near it when --expect is not given)')
    .option('--pass-if <rule>', 'when a map passes the spec: in-spec>=P% (default in-spec>=99%), mean (the mean in spec) or all (every inspected pixel measured and in spec)')
    .option('--fail-if-out-of-spec', `exit with status 1 when any ${scope === 'photo' ? 'photo' : 'frame'} fails the spec`)
    .option('--edge-exclusion <mm>', "leave out a band this wide along the film area's outline (needs --pixel-size, --part-diameter or --part-width)")
    .option('--part-diameter <mm>', 'the part (wafer, disc) is round with this diameter: sets the pixel size from the film area')
    .option('--part-width <mm>', "the part is this wide across the photo: sets the pixel size from the film area's width");
  if (scope === 'photo') {
    command
      .option('--points <file.csv|polar:N>', "thickness at points, written to <stem>.points.csv: a CSV with header x_px,y_px (pixels) or x_mm,y_mm (mm from the part's centre, y up), optional label; or polar:N (centre plus N rings of 8, 16, … points)")
      .option('--profile <x0,y0,x1,y1>', 'thickness along a line (pixels), written to <stem>.profile-K.csv (repeatable)', collect);
  }
  return command;
}

/** Parses the options (usage errors name the option; an unreadable points file is an input error). */
export function inspectFromOptions(opts: InspectCliOptions): InspectOptions | null {
  if (opts.passIf !== undefined && opts.spec === undefined) throw new UsageError('--pass-if needs --spec');
  if (opts.failIfOutOfSpec && opts.spec === undefined) throw new UsageError('--fail-if-out-of-spec needs --spec');
  if (opts.partDiameter !== undefined && opts.partWidth !== undefined) throw new UsageError('give either --part-diameter or --part-width, not both');
  const spec = opts.spec !== undefined ? parseSpec(opts.spec) : null;
  const mm = (text: string | undefined, option: string): number | null => {
    if (text === undefined) return null;
    const v = parseNumberOption(text, option, 'a number of mm');
    if (!(v > 0 && v <= 1e5)) throw new UsageError(`${option} must be a number of mm > 0, received ${text}`);
    return v;
  };
  let edgeExclusionMm: number | null = null;
  if (opts.edgeExclusion !== undefined) {
    edgeExclusionMm = parseNumberOption(opts.edgeExclusion, '--edge-exclusion', 'a number of mm >= 0');
    if (!(edgeExclusionMm >= 0)) throw new UsageError(`--edge-exclusion must be a number of mm >= 0, received ${opts.edgeExclusion}`);
  }
  const diameter = mm(opts.partDiameter, '--part-diameter');
  const width = mm(opts.partWidth, '--part-width');
  let points: InspectOptions['points'] = null;
  if (opts.points !== undefined) {
    points = parsePolar(opts.points);
    if (!points) {
      if (/^polar:/i.test(opts.points.trim())) throw new UsageError(`--points polar:N takes a whole number N of rings, received ${JSON.stringify(opts.points)}`);
      let text: string;
      try {
        text = readFileSync(opts.points, 'utf8');
      } catch (error) {
        throw new InputError(opts.points, `cannot read the --points file (${(error as NodeJS.ErrnoException).code ?? String(error)})`);
      }
      points = parsePointsCsv(text, opts.points);
    }
  }
  const profiles = (opts.profile ?? []).map(parseProfile);
  const options: InspectOptions = {
    spec,
    passIf: opts.passIf !== undefined ? parsePassRule(opts.passIf) : DEFAULT_PASS_RULE,
    edgeExclusionMm,
    part: diameter !== null ? { kind: 'diameter', sizeMm: diameter } : width !== null ? { kind: 'width', sizeMm: width } : null,
    points,
    profiles,
  };
  const any = spec || edgeExclusionMm !== null || options.part || points || profiles.length > 0;
  return any ? options : null;
}
