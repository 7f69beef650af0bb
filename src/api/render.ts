/**
 * `render`: the library's one call for what `lamella render` does — the photo a camera would take
 * of a film with a given thickness map, in memory (write it with `writeImage`).
 */
import type { Camera } from '../colour/camera.js';
import { cameraFromSpec, type CameraSpec } from '../colour/cameraSpec.js';
import type { Light } from '../colour/light.js';
import { resolveLight } from '../colour/lights.js';
import { readThicknessGrid } from '../io/readThicknessGrid.js';
import { resolveStack } from '../optics/resolveStack.js';
import type { Stack } from '../optics/types.js';
import { renderPhoto, type RenderOptions, type RenderResult } from '../render/renderPhoto.js';

/** A thickness map in memory: nm per pixel, row by row. */
export interface ThicknessMapInput {
  readonly thicknessNm: Float32Array;
  readonly width: number;
  readonly height: number;
}

export type RenderJobOptions = Omit<RenderOptions, 'stack' | 'light' | 'whiteBalanceLight' | 'camera'> & {
  /** The film stack: a preset name, a stack file, or a resolved Stack. */
  readonly stack: Stack | string;
  /** The light: a name (`D65`, `F11`, …), an SPD file, or a Light. */
  readonly light: Light | string;
  /** The light the camera was white-balanced for, if not `light`. */
  readonly whiteBalanceLight?: Light | string;
  /** `srgb` (default), `linear`, a spectral sensitivities CSV (`wavelength_nm,r,g,b`), or a ready Camera. */
  readonly camera?: CameraSpec | Camera;
  /** nm per count, when the input file is a 16-bit PNG or TIFF thickness map. */
  readonly pngScaleNm?: number;
};

/**
 * Renders a thickness map into the photo a camera would take of the film: the forward model
 * `mapPhoto` inverts (film spectra under the light, the camera, exposure, flare, white balance,
 * noise), encoded at 8 or 16 bits.
 *
 * @param input a thickness file (.npy, float TIFF, or 16-bit PNG/TIFF with `pngScaleNm`) or a map in memory
 * @param options the film, the light, the camera and the photo formation
 * @returns the pixels (RGB, 8- or 16-bit), the camera used and warnings (e.g. pixels without a thickness)
 * @example
 * const photo = await render('wafer.npy', { stack: 'oxide-on-silicon', light: 'F11', exposure: 1.2, noiseSigma: 0.002 });
 * await writeImage('wafer.png', photo);
 */
export async function render(input: string | ThicknessMapInput, options: RenderJobOptions): Promise<RenderResult> {
  const stack = typeof options.stack === 'string' ? resolveStack(options.stack) : options.stack;
  const light = typeof options.light === 'string' ? resolveLight(options.light) : options.light;
  const whiteBalanceLight = typeof options.whiteBalanceLight === 'string' ? resolveLight(options.whiteBalanceLight) : options.whiteBalanceLight;
  const camera =
    options.camera === undefined || typeof options.camera === 'string'
      ? options.camera === undefined || options.camera === 'srgb'
        ? undefined
        : cameraFromSpec(options.camera, light, whiteBalanceLight, options.observer)
      : options.camera;
  // The thickness file is read last: a bad camera or light file is named before a large read.
  const grid = typeof input === 'string' ? await readThicknessGrid(input, { pngScaleNm: options.pngScaleNm }) : { data: input.thicknessNm, width: input.width, height: input.height };
  return renderPhoto(grid.data, grid.width, grid.height, { ...options, stack, light, whiteBalanceLight, camera });
}
