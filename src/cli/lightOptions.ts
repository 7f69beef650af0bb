/**
 * The light options every command that models a photo shares — `--light` and
 * `--white-balance` — declared once, and the check that turns a light name or SPD file into a
 * Light (an unknown name is a usage error naming the option; a bad SPD file an input error).
 */
import type { Command } from 'commander';
import { CsvFormatError } from '../colour/readNumericCsv.js';
import type { Light } from '../colour/light.js';
import { LIGHT_NAMES, resolveLight } from '../colour/lights.js';
import { InputError, UsageError } from './errors.js';

const LIGHT_HELP = `light the film is seen under: ${LIGHT_NAMES.join(', ')}, blackbody:<K>, line:<nm>, or an SPD CSV file`;
const WHITE_BALANCE_HELP = 'the light the camera was white-balanced for, if not the light itself';

/** Declares `--light` (required, or defaulting to D65) and `--white-balance`. */
export function addLightOptions(command: Command, light: { required: boolean }): Command {
  if (light.required) command.requiredOption('--light <light>', LIGHT_HELP);
  else command.option('--light <light>', LIGHT_HELP, 'D65');
  return command.option('--white-balance <light>', WHITE_BALANCE_HELP);
}

export function lightFromOption(spec: string, option: string): Light {
  try {
    return resolveLight(spec);
  } catch (error) {
    if (error instanceof CsvFormatError) throw new InputError(error.file, error.message.slice(error.file.length).replace(/^[,:]\s*/, ''));
    if (error instanceof RangeError || error instanceof TypeError) throw new UsageError(`${option}: ${error.message}`);
    throw error;
  }
}

/** Both options checked before any photo is read: the light, and the white-balance light if given. */
export function lightsFromOptions(opts: { light: string; whiteBalance?: string }): { light: Light; whiteBalance: Light | undefined } {
  return {
    light: lightFromOption(opts.light, '--light'),
    whiteBalance: opts.whiteBalance ? lightFromOption(opts.whiteBalance, '--white-balance') : undefined,
  };
}
