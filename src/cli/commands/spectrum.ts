/**
 * `lamella spectrum`: reflectance, transmittance and absorptance of the stack at one film
 * thickness, as CSV (`wavelength_nm,reflectance,transmittance,absorptance`, fractions 0–1) or JSON.
 */
import { Option, type Command } from 'commander';
import { DataFileError } from '../../optics/dataFileError.js';
import { stackSpectrum } from '../../optics/stackSpectrum.js';
import type { Polarisation } from '../../optics/types.js';
import { wavelengthGrid } from '../../optics/wavelengthGrid.js';
import { InputError, UsageError } from '../errors.js';
import { checkOutputFile } from '../outputFile.js';
import { assertNoInputOverwritten } from '../../io/ensureOutputDir.js';
import { atomicWriteFile } from '../../io/atomicWriteFile.js';
import { LAMELLA_VERSION } from '../../version.js';
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

/** Version of the `spectrum --json` record (schemas/spectrum.schema.json). */
export const SPECTRUM_SCHEMA_VERSION = 1;

/** Fixed-point text with tiny rounding residues (|x| < 5e-11) shown as 0. */
function fraction(x: number): string {
  return (Math.abs(x) < 5e-11 ? 0 : x).toFixed(10);
}

function wavelengthText(x: number): string {
  return String(Number(x.toFixed(6)));
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
  let wavelengthsNm: Float64Array;
  try {
    wavelengthsNm = wavelengthGrid(fromNm, toNm, stepNm);
  } catch (error) {
    throw new UsageError(`--from/--to/--step: ${(error as Error).message}`);
  }
  const { stack, angleRad } = stackFromOptions(opts, { onWarning: (message) => process.stderr.write(`lamella: warning: ${message}\n`) });
  let spectrum;
  try {
    spectrum = stackSpectrum(stack, thicknessNm, wavelengthsNm, angleRad, opts.polarisation);
  } catch (error) {
    if (error instanceof DataFileError) throw new InputError(error.file, error.detail);
    throw error;
  }
  const { reflectance, transmittance, absorptance } = spectrum;
  if (opts.json) {
    const record = {
      schema_version: SPECTRUM_SCHEMA_VERSION,
      lamella_version: LAMELLA_VERSION,
      stack: stack.name,
      ambient: stack.ambient.name,
      layers: stack.layers.map((layer) => ({ material: layer.material.name, thickness_nm: layer.thicknessNm === 'film' ? thicknessNm : layer.thicknessNm, film: layer.thicknessNm === 'film' })),
      substrate: stack.substrate.name,
      thickness_nm: thicknessNm,
      angle_deg: (angleRad * 180) / Math.PI,
      polarisation: opts.polarisation,
      wavelengths_nm: Array.from(wavelengthsNm),
      reflectance: Array.from(reflectance),
      transmittance: Array.from(transmittance),
      absorptance: Array.from(absorptance, (a) => (Math.abs(a) < 5e-11 ? 0 : a)),
    };
    await emit(out, `${JSON.stringify(record, null, 2)}\n`);
    return;
  }
  const lines = ['wavelength_nm,reflectance,transmittance,absorptance'];
  for (let j = 0; j < wavelengthsNm.length; j++) {
    lines.push(`${wavelengthText(wavelengthsNm[j])},${fraction(reflectance[j])},${fraction(transmittance[j])},${fraction(absorptance[j])}`);
  }
  await emit(out, `${lines.join('\n')}\n`);
}

async function emit(out: string | null, text: string): Promise<void> {
  if (out) {
    // The stack, material and SPD files were read after the first check: none may be --out.
    assertNoInputOverwritten([], [out]);
    await atomicWriteFile(out, Buffer.from(text, 'utf8'));
  } else process.stdout.write(text);
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
