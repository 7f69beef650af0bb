/**
 * `lamella spectrum`: reflectance, transmittance and absorptance of the stack at one film
 * thickness, as CSV (`wavelength_nm,reflectance,transmittance,absorptance`, fractions 0–1) or JSON.
 */
import { Option, type Command } from 'commander';
import { DataFileError } from '../../optics/dataFileError.js';
import type { Polarisation } from '../../optics/types.js';
import { spectrum } from '../../api/spectrum.js';
import { InputError, UsageError } from '../errors.js';
import { checkOutputFile } from '../outputFile.js';
import { assertNoInputOverwritten } from '../../io/ensureOutputDir.js';
import { atomicWriteFile } from '../../io/atomicWriteFile.js';
import { addStackOptions, parseNumberOption, stackFromOptions, type StackCliOptions } from '../stackOptions.js';

interface SpectrumOptions extends StackCliOptions {
  thickness: string;
  polarisation: Polarisation;
  from: string;
  to: string;
  step: string;
  json?: boolean;
  out?: string;
  force?: boolean;
}

async function run(opts: SpectrumOptions): Promise<void> {
  // `--out -` (or no --out) is standard output.
  const out = opts.out === undefined || opts.out === '-' ? null : opts.out;
  if (out) await checkOutputFile(out, { force: opts.force === true, inputs: [], example: opts.json ? 'spectrum.json' : 'spectrum.csv' });
  const thicknessNm = parseNumberOption(opts.thickness, '--thickness', 'a finite number of nm >= 0');
  if (thicknessNm < 0) throw new UsageError(`--thickness must be a finite number of nm >= 0, received ${thicknessNm}`);
  const fromNm = parseNumberOption(opts.from, '--from', 'a wavelength in nm');
  const toNm = parseNumberOption(opts.to, '--to', 'a wavelength in nm');
  const stepNm = parseNumberOption(opts.step, '--step', 'a step in nm');
  const { stack, angleRad } = stackFromOptions(opts, { onWarning: (message) => process.stderr.write(`lamella: warning: ${message}\n`) });
  let result;
  try {
    result = spectrum({ stack, thicknessNm, angleRad, polarisation: opts.polarisation, fromNm, toNm, stepNm, format: opts.json ? 'json' : 'csv' });
  } catch (error) {
    if (error instanceof DataFileError) throw new InputError(error.file, error.detail);
    if (error instanceof RangeError && /^(fromNm|toNm|stepNm|wavelength grid)/.test(error.message)) throw new UsageError(`--from/--to/--step: ${error.message}`);
    throw error;
  }
  if (out) {
    // The stack, material and SPD files were read after the first check: none may be --out.
    assertNoInputOverwritten([], [out]);
    await atomicWriteFile(out, Buffer.from(result.text, 'utf8'));
  } else process.stdout.write(result.text);
}

export function register(program: Command): void {
  const command = program
    .command('spectrum')
    .description('reflectance, transmittance and absorptance spectra of a film stack at one thickness (CSV or JSON)');
  addStackOptions(command)
    .requiredOption('--thickness <nm>', 'film thickness in nm (>= 0)')
    .addOption(new Option('--polarisation <mode>', 'polarisation of the light').choices(['s', 'p', 'mixed']).default('mixed'))
    .option('--from <nm>', 'first wavelength, nm', '380')
    .option('--to <nm>', 'last wavelength, nm', '780')
    .option('--step <nm>', 'wavelength step, nm', '1')
    .option('--json', 'print a JSON object with the settings and arrays instead of CSV')
    .option('--out <file>', "write to this file (atomically) instead of standard output; '-' is standard output")
    .option('--force', 'replace an existing --out file')
    .addHelpText(
      'after',
      '\nValues are computed from published optical constants. Deposited films (oxides, nitrides, polymers)\n' +
        'often differ from bulk data: confirm with qualified metrology before using numbers for release decisions.',
    )
    .action((opts: SpectrumOptions) => run(opts));
}
