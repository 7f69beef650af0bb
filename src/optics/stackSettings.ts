/**
 * The film stack and angle from the stack settings a user gave (`--stack`, `--film-index`,
 * `--angle`, `--extrapolate`), with usage and input errors that name the option. Core code: the
 * CLI declares the options (../cli/stackOptions.ts), series workers rebuild the stack from the
 * same settings (../series/mapFrameProcessor.ts).
 */
import { DataFileError } from './dataFileError.js';
import { listMaterialNames } from './materialLibrary.js';
import { listStackPresetNames } from './presets.js';
import { resolveStack } from './resolveStack.js';
import type { Stack } from './types.js';
import { InputError, UsageError } from '../errors.js';
import { parseDecimal } from '../io/parseDecimal.js';

export interface StackCliOptions {
  readonly stack?: string;
  readonly filmIndex?: string;
  readonly angle?: string | number;
  readonly extrapolate?: boolean;
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
