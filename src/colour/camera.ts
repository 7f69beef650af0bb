/**
 * The camera model: one 3 × N weight matrix from a film's spectral reflectance R(λ) to the
 * linear RGB the photo records. Every step is linear in R(λ), so the whole chain folds into
 * the weights once and a colour lookup is N multiply-adds per channel.
 *
 * Default camera (writes sRGB): XYZ under the light (CIE 15:2004 §7, Y_white = 100), von Kries
 * adaptation with the Bradford matrix (Lam 1985) from the white-balance light's white to the
 * sRGB D65 white, then the sRGB matrix (IEC 61966-2-1:1999). With white balance set to the
 * light itself a perfect white reflector gives linear RGB (1, 1, 1); left at another light,
 * the photo shows that light's colour cast (e.g. a daylight setting under tungsten).
 * User camera (writes linear raw): weights_c(λ) = s_c(λ)·S(λ)·Δλ / Σ s_c·S_wb·Δλ, with both
 * lights scaled to equal luminance (Y, chosen observer), so the white-balance light's white
 * gives (1, 1, 1).
 */
import { chromaticAdaptationMatrix, type AdaptationMethod } from './chromaticAdaptation.js';
import { type Light, lightOnGrid } from './light.js';
import { colourMatchingFunctionsOn, type ObserverName, checkObserver } from './observers.js';
import type { CameraSensitivities } from './readCameraSensitivities.js';
import { SRGB_WHITE_XYZ, XYZ_TO_LINEAR_SRGB } from './srgb.js';
import { type Matrix3, multiplyMatrix3 } from './matrix3.js';
import { integrationGrid, whitePointXyz, xyzWeights } from './xyzWeights.js';
import { DEFAULT_GRID, type GridSpec, intervalWeightsNm, resampleLinear } from './spectralGrid.js';

export interface Camera {
  readonly wavelengthsNm: Float64Array;
  /** 3 × nWavelengths row-major: linear RGB_c = Σ_j weights[c*n + j] * R(λ_j) */
  readonly weights: Float64Array;
  readonly encoding: 'srgb' | 'linear';
  readonly description: string;
}

export interface CameraOptions {
  readonly light: Light;
  readonly observer?: ObserverName;
  /** Light the camera is white-balanced for; default: the light itself. */
  readonly whiteBalance?: Light;
  /** Spectral sensitivities of a raw camera; default: the sRGB camera described above. */
  readonly sensitivities?: CameraSensitivities;
  /** Integration grid; default 380–780 nm at 1 nm (ignored for a line light). */
  readonly grid?: GridSpec;
  readonly adaptation?: AdaptationMethod;
  /**
   * The default sRGB camera, but writing values proportional to light (no transfer function):
   * scientific cameras and raw converters' linear output with sRGB primaries. Ignored with
   * `sensitivities` (a raw camera is linear already).
   */
  readonly linear?: boolean;
}

export function buildCamera(options: CameraOptions): Camera {
  const { light, sensitivities } = options;
  if (!light || typeof light !== 'object' || !(light.wavelengthsNm instanceof Float64Array)) {
    throw new TypeError(`buildCamera: light must be a Light record (see resolveLight), received ${typeof light}`);
  }
  const observer = checkObserver(options.observer ?? '1931');
  const whiteBalance = options.whiteBalance ?? light;
  const grid = options.grid ?? DEFAULT_GRID;
  const wavelengthsNm = integrationGrid(light, grid);
  const wbText = whiteBalance === light ? 'white-balanced to the light' : `white balance set for ${whiteBalance.name}`;
  if (sensitivities) {
    return {
      wavelengthsNm,
      weights: rawCameraWeights(light, whiteBalance, sensitivities, observer, wavelengthsNm, grid),
      encoding: 'linear',
      description: `raw camera ${sensitivities.name} under ${light.name}, ${wbText}; linear output`,
    };
  }
  const xyz = xyzWeights(light, observer, wavelengthsNm);
  const toRgb = srgbCameraMatrix(whiteBalance, observer, grid, options.adaptation ?? 'bradford');
  const n = wavelengthsNm.length;
  const weights = new Float64Array(3 * n);
  for (let c = 0; c < 3; c++) {
    for (let j = 0; j < n; j++) {
      weights[c * n + j] = toRgb[c * 3] * xyz[j] + toRgb[c * 3 + 1] * xyz[n + j] + toRgb[c * 3 + 2] * xyz[2 * n + j];
    }
  }
  return {
    wavelengthsNm,
    weights,
    encoding: options.linear === true ? 'linear' : 'srgb',
    description: `${options.linear === true ? 'linear camera with sRGB primaries' : 'sRGB camera'} under ${light.name} (CIE ${observer} observer), ${wbText}, Bradford adaptation to D65`,
  };
}

/**
 * The default camera's matrix from XYZ under the light (Y_white = 100 scale) to linear sRGB:
 * sRGB matrix · Bradford adaptation from the white-balance light's white to the sRGB D65 white, / 100.
 */
export function srgbCameraMatrix(
  whiteBalance: Light,
  observer: ObserverName = '1931',
  grid: GridSpec = DEFAULT_GRID,
  adaptation: AdaptationMethod = 'bradford',
): Matrix3 {
  const adapt = chromaticAdaptationMatrix(whitePointXyz(whiteBalance, observer, grid), SRGB_WHITE_XYZ.map((v) => v * 100), adaptation);
  return multiplyMatrix3(XYZ_TO_LINEAR_SRGB, adapt).map((v) => v / 100);
}

function luminanceScale(light: Light, observer: ObserverName, gridNm: Float64Array): number {
  const spd = lightOnGrid(light, gridNm);
  const yBar = colourMatchingFunctionsOn(gridNm, observer).yBar;
  const dl = intervalWeightsNm(gridNm);
  let sum = 0;
  for (let j = 0; j < gridNm.length; j++) sum += spd[j] * yBar[j] * dl[j];
  if (!(sum > 0)) throw new RangeError(`light ${light.name} gives no luminance; expected some visible power`);
  return 1 / sum;
}

function rawCameraWeights(
  light: Light,
  whiteBalance: Light,
  sensitivities: CameraSensitivities,
  observer: ObserverName,
  gridNm: Float64Array,
  gridSpec: GridSpec,
): Float64Array {
  const n = gridNm.length;
  const wbGrid = integrationGrid(whiteBalance, gridSpec);
  const kLight = luminanceScale(light, observer, gridNm);
  const kWb = luminanceScale(whiteBalance, observer, wbGrid);
  const spd = lightOnGrid(light, gridNm);
  const spdWb = lightOnGrid(whiteBalance, wbGrid);
  const dl = intervalWeightsNm(gridNm);
  const dlWb = intervalWeightsNm(wbGrid);
  const weights = new Float64Array(3 * n);
  [sensitivities.r, sensitivities.g, sensitivities.b].forEach((column, c) => {
    const s = resampleLinear(sensitivities.wavelengthsNm, column, gridNm);
    const sWb = resampleLinear(sensitivities.wavelengthsNm, column, wbGrid);
    let whiteResponse = 0;
    for (let j = 0; j < wbGrid.length; j++) whiteResponse += kWb * sWb[j] * spdWb[j] * dlWb[j];
    if (!(whiteResponse > 0)) {
      throw new RangeError(`camera ${sensitivities.name}: channel ${'rgb'[c]} sees nothing under white-balance light ${whiteBalance.name}`);
    }
    for (let j = 0; j < n; j++) weights[c * n + j] = (kLight * s[j] * spd[j] * dl[j]) / whiteResponse;
  });
  return weights;
}
