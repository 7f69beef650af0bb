/**
 * Shared CLI options for choosing the film stack, used by every command that models a film:
 *   --stack <preset|file>          required: a preset name or a stack JSON file
 *   --film-index <material|number> replaces the film material (library name, material file, or n)
 *   --angle <deg>                  angle of incidence in the ambient, [0, 90), default 0
 *   --extrapolate                  allow materials outside their valid wavelength range (warns)
 */
import type { Command } from 'commander';
import { DataFileError } from '../optics/dataFileError.js';
import { listMaterialNames } from '../optics/materialLibrary.js';
import { listStackPresetNames } from '../optics/presets.js';
import { resolveStack } from '../optics/resolveStack.js';
import type { Stack } from '../optics/types.js';
import { InputError, UsageError } from './errors.js';
import { parseDecimal } from './parseDecimal.js';

export interface StackCliOptions {
  readonly stack?: string;
  readonly filmIndex?: string;
  readonly angle?: string | number;
  readonly extrapolate?: boolean;
}

export function addStackOptions(command: Command): Command {
  return command
    .requiredOption('--stack <preset|file>', `film stack: a preset (${listStackPresetNames().join(', ')}) or a stack JSON file`)
    .option('--film-index <material|number>', 'film material instead of the stack\'s: a library name (e.g. glycerol-water:20), a material file, or a refractive index such as 1.40')
    .option('--angle <deg>', 'angle of incidence in the ambient, degrees, 0 <= angle < 90', '0')
    .option('--extrapolate', 'allow materials outside their valid wavelength range (a warning is printed)');
}

/** Parses a number option; UsageError naming the option otherwise. */
export function parseNumberOption(value: string | number | undefined, option: string, expected: string): number {
  const number = typeof value === 'number' ? value : value === undefined ? Number.NaN : parseDecimal(value);
  if (!Number.isFinite(number)) throw new UsageError(`${option} must be ${expected}, received ${JSON.stringify(value ?? '')}`);
  return number;
}

/** The stack and angle from parsed options. `onWarning` receives extrapolation warnings. */
export function stackFromOptions(
  opts: StackCliOptions,
  extra: { onWarning?: (message: string) => void; filmIndexScale?: number } = {},
): { stack: Stack; angleRad: number } {
  if (opts.stack === undefined || opts.stack.trim() === '') {
    throw new UsageError(`--stack is required: a preset (${listStackPresetNames().join(', ')}) or a stack JSON file`);
  }
  const angleDeg = parseNumberOption(opts.angle ?? '0', '--angle', 'a number of degrees in [0, 90)');
  if (angleDeg < 0 || angleDeg >= 90) throw new UsageError(`--angle must be a number of degrees in [0, 90), received ${angleDeg}`);
  let stack: Stack;
  try {
    stack = resolveStack(opts.stack, {
      filmMaterial: opts.filmIndex,
      filmIndexScale: extra.filmIndexScale,
      extrapolate: opts.extrapolate === true,
      onWarning: extra.onWarning,
    });
  } catch (error) {
    if (error instanceof DataFileError) throw new InputError(error.file, error.detail);
    if (error instanceof RangeError && /^unknown stack/.test(error.message)) {
      throw new UsageError(`--stack: unknown preset '${opts.stack}' and no such file; valid presets: ${listStackPresetNames().join(', ')}`);
    }
    if (error instanceof RangeError && /^unknown film material/.test(error.message)) {
      throw new UsageError(`--film-index: unknown material '${opts.filmIndex}'; give a number, a material file (.json/.csv) or one of ${listMaterialNames().join(', ')}`);
    }
    if (error instanceof RangeError && opts.filmIndex !== undefined && /^constant index/.test(error.message)) {
      throw new UsageError(`--film-index: ${error.message.replace(/^constant index: /, '')} (a refractive index such as 1.40)`);
    }
    if (error instanceof RangeError || error instanceof TypeError) throw new UsageError(error.message);
    throw error;
  }
  return { stack, angleRad: (angleDeg * Math.PI) / 180 };
}
