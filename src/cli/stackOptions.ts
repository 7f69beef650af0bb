/**
 * Shared CLI options for choosing the film stack, used by every command that models a film:
 *   --stack <preset|file>          required: a preset name or a stack JSON file
 *   --film-index <material|number> replaces the film material (library name, material file, or n)
 *   --angle <deg>                  angle of incidence in the ambient, [0, 90), default 0
 *   --extrapolate                  allow materials outside their valid wavelength range (warns)
 */
import type { Command } from 'commander';
import { listStackPresetNames } from '../optics/presets.js';

export { type StackCliOptions, parseNumberOption, stackFromOptions } from '../optics/stackSettings.js';

export function addStackOptions(command: Command): Command {
  return command
    .requiredOption('--stack <preset|file>', `film stack: a preset (${listStackPresetNames().join(', ')}) or a stack JSON file`)
    .option('--film-index <material|number>', 'film material instead of the stack\'s: a library name (e.g. glycerol-water:20), a material file, or a refractive index such as 1.40')
    .option('--angle <deg>', 'angle of incidence in the ambient, degrees, 0 <= angle < 90', '0')
    .option('--extrapolate', 'allow materials outside their valid wavelength range (a warning is printed)');
}
