/**
 * Renders a thickness map into the photo a camera would take of the film: per pixel, the linear
 * camera RGB from a thickness lookup table (./thicknessColourLut.ts, linear interpolation), then
 * the shared photo model (../colour/exposureModel.ts): exposure · (W(gains)·rgb)_c + flare_c +
 * Gaussian noise (seeded; ../colour/normalQuantiles.ts), clamped, encoded (sRGB or linear) and
 * quantised to 8 or 16 bits through a code table (../colour/encodedCodeTable.ts).
 * Pixels with NaN, negative or infinite thickness are rendered black and counted in a warning.
 */
import { buildCamera, type Camera } from '../colour/camera.js';
import { balanceTable, checkPhotoFormation, type PhotoFormationInput } from '../colour/exposureModel.js';
import type { Light } from '../colour/light.js';
import type { ObserverName } from '../colour/observers.js';
import { encodedCodeTable } from '../colour/encodedCodeTable.js';
import { normalQuantileTable } from '../colour/normalQuantiles.js';
import type { Polarisation, Stack } from '../optics/types.js';
import { thicknessColourLut } from './thicknessColourLut.js';

export interface RenderOptions extends PhotoFormationInput {
  readonly stack: Stack;
  readonly light: Light;
  readonly angleRad?: number;
  readonly polarisation?: Polarisation;
  readonly filmIndexScale?: number;
  readonly observer?: ObserverName;
  /** Light the camera is white-balanced for (default: `light`). */
  readonly whiteBalanceLight?: Light;
  /** A ready camera (e.g. from spectral sensitivities); default: the sRGB camera for the light. */
  readonly camera?: Camera;
  /** Gaussian sensor noise, standard deviation in linear units (0..1 scale); default 0. */
  readonly noiseSigma?: number;
  /** Seed of the noise generator; default 1. */
  readonly seed?: number;
  readonly bitDepth?: 8 | 16;
  /** Thickness step of the lookup table, nm; default 0.5. */
  readonly lutStepNm?: number;
}

export interface RenderResult {
  readonly data: Uint8Array | Uint16Array;
  readonly width: number;
  readonly height: number;
  readonly channels: 3;
  readonly camera: Camera;
  readonly warnings: string[];
}

function checkSize(thicknessNm: Float32Array, width: number, height: number): void {
  if (!(thicknessNm instanceof Float32Array)) throw new TypeError(`thicknessNm must be a Float32Array, received ${Object.prototype.toString.call(thicknessNm)}`);
  if (!Number.isInteger(width) || width < 1) throw new RangeError(`width must be an integer >= 1, received ${width}`);
  if (!Number.isInteger(height) || height < 1) throw new RangeError(`height must be an integer >= 1, received ${height}`);
  if (thicknessNm.length !== width * height) {
    throw new RangeError(`thicknessNm must hold width × height = ${width * height} values, received ${thicknessNm.length}`);
  }
}

/**
 * The photo a camera would take of a film with this thickness map (nm, row by row): the forward
 * model `lamella map` inverts — film spectra under the light, the camera's response, exposure,
 * flare, white balance and sensor noise, encoded at 8 or 16 bits. What `lamella render` writes.
 *
 * @param thicknessNm film thickness per pixel, nm (NaN: rendered black, with a warning)
 * @example
 * const { data } = renderPhoto(thicknessNm, 320, 240, { stack: resolveStack('soap-film'), light: resolveLight('D65'), exposure: 7, bitDepth: 8 });
 */
export function renderPhoto(thicknessNm: Float32Array, width: number, height: number, options: RenderOptions): RenderResult {
  checkSize(thicknessNm, width, height);
  const formation = checkPhotoFormation(options);
  const noiseSigma = options.noiseSigma ?? 0;
  if (!Number.isFinite(noiseSigma) || noiseSigma < 0) throw new RangeError(`noiseSigma must be a finite number >= 0, received ${noiseSigma}`);
  const seed = options.seed ?? 1;
  if (!Number.isInteger(seed)) throw new RangeError(`seed must be an integer, received ${seed}`);
  const bitDepth = options.bitDepth ?? 8;
  if (bitDepth !== 8 && bitDepth !== 16) throw new RangeError(`bitDepth must be 8 or 16, received ${String(bitDepth)}`);
  const camera = options.camera ?? buildCamera({ light: options.light, observer: options.observer, whiteBalance: options.whiteBalanceLight });

  let minNm = Infinity;
  let maxNm = -Infinity;
  let nanCount = 0;
  let badCount = 0;
  for (let p = 0; p < thicknessNm.length; p++) {
    const d = thicknessNm[p];
    if (d !== d) nanCount++;
    else if (d < 0 || d === Infinity) badCount++;
    else {
      if (d < minNm) minNm = d;
      if (d > maxNm) maxNm = d;
    }
  }
  const warnings: string[] = [];
  if (nanCount > 0) warnings.push(`${nanCount} pixel${nanCount === 1 ? '' : 's'} with no thickness (NaN) rendered black`);
  if (badCount > 0) warnings.push(`${badCount} pixel${badCount === 1 ? '' : 's'} with negative or infinite thickness rendered black`);

  const pixels = thicknessNm.length;
  const data = bitDepth === 8 ? new Uint8Array(pixels * 3) : new Uint16Array(pixels * 3);
  if (minNm > maxNm) return { data, width, height, channels: 3, camera, warnings };

  const lut = thicknessColourLut(options.stack, camera, minNm, maxNm, options.angleRad ?? 0, {
    stepNm: options.lutStepNm,
    polarisation: options.polarisation,
    filmIndexScale: options.filmIndexScale,
  });
  // Exposure and white balance folded into the table once (W(gains), ../colour/exposureModel.ts).
  const table = balanceTable(lut.rgbLinear, formation, camera.encoding);
  const last = lut.count - 2;
  const inverseStep = 1 / lut.stepNm;
  const from = lut.fromNm;
  const { codes, maxIndex } = encodedCodeTable(camera.encoding, bitDepth);
  const [f0, f1, f2] = formation.flare;
  const quantiles = normalQuantileTable();
  // Mulberry32 stream (see ../colour/seededNormal.ts), inlined: three draws per noisy pixel.
  let state = seed >>> 0;
  const noisy = noiseSigma > 0;

  for (let p = 0; p < pixels; p++) {
    const d = thicknessNm[p];
    if (!(d >= 0) || d === Infinity) continue;
    const t = (d - from) * inverseStep;
    let i = t | 0;
    if (i > last) i = last;
    const f = t - i;
    const k = i * 3;
    let r = table[k] + f * (table[k + 3] - table[k]) + f0;
    let g = table[k + 1] + f * (table[k + 4] - table[k + 1]) + f1;
    let b = table[k + 2] + f * (table[k + 5] - table[k + 2]) + f2;
    if (noisy) {
      for (let c = 0; c < 3; c++) {
        state = (state + 0x6d2b79f5) >>> 0;
        let z = state;
        z = Math.imul(z ^ (z >>> 15), z | 1);
        z ^= z + Math.imul(z ^ (z >>> 7), z | 61);
        const deviate = noiseSigma * quantiles[((z ^ (z >>> 14)) >>> 16) & 0xffff];
        if (c === 0) r += deviate;
        else if (c === 1) g += deviate;
        else b += deviate;
      }
    }
    const o = p * 3;
    data[o] = codes[((r < 0 ? 0 : r > 1 ? 1 : r) * maxIndex + 0.5) | 0];
    data[o + 1] = codes[((g < 0 ? 0 : g > 1 ? 1 : g) * maxIndex + 0.5) | 0];
    data[o + 2] = codes[((b < 0 ? 0 : b > 1 ? 1 : b) * maxIndex + 0.5) | 0];
  }
  return { data, width, height, channels: 3, camera, warnings };
}
