/**
 * A stack's spectrum at one film thickness as the files `lamella spectrum` writes: CSV
 * (`wavelength_nm,reflectance,transmittance,absorptance`, fractions 0–1) or a JSON record
 * (schemas/spectrum.schema.json).
 */
import type { StackSpectrum } from '../optics/stackSpectrum.js';
import type { Polarisation, Stack } from '../optics/types.js';
import { LAMELLA_VERSION } from '../version.js';

/** Version of the `spectrum --json` record (schemas/spectrum.schema.json). */
export const SPECTRUM_SCHEMA_VERSION = 1;

/** Tiny rounding residues (|x| < 5e-11) shown as 0. */
function clean(x: number): number {
  return Math.abs(x) < 5e-11 ? 0 : x;
}

export function spectrumCsv(wavelengthsNm: Float64Array, spectrum: StackSpectrum): string {
  const lines = ['wavelength_nm,reflectance,transmittance,absorptance'];
  const { reflectance, transmittance, absorptance } = spectrum;
  for (let j = 0; j < wavelengthsNm.length; j++) {
    lines.push(
      `${String(Number(wavelengthsNm[j].toFixed(6)))},${clean(reflectance[j]).toFixed(10)},${clean(transmittance[j]).toFixed(10)},${clean(absorptance[j]).toFixed(10)}`,
    );
  }
  return `${lines.join('\n')}\n`;
}

export function spectrumRecord(
  wavelengthsNm: Float64Array,
  spectrum: StackSpectrum,
  setting: { stack: Stack; thicknessNm: number; angleRad: number; polarisation: Polarisation },
): Record<string, unknown> {
  const { stack, thicknessNm } = setting;
  return {
    schema_version: SPECTRUM_SCHEMA_VERSION,
    lamella_version: LAMELLA_VERSION,
    stack: stack.name,
    ambient: stack.ambient.name,
    layers: stack.layers.map((layer) => ({ material: layer.material.name, thickness_nm: layer.thicknessNm === 'film' ? thicknessNm : layer.thicknessNm, film: layer.thicknessNm === 'film' })),
    substrate: stack.substrate.name,
    thickness_nm: thicknessNm,
    angle_deg: (setting.angleRad * 180) / Math.PI,
    polarisation: setting.polarisation,
    wavelengths_nm: Array.from(wavelengthsNm),
    reflectance: Array.from(spectrum.reflectance),
    transmittance: Array.from(spectrum.transmittance),
    absorptance: Array.from(spectrum.absorptance, clean),
  };
}
