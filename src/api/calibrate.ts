/**
 * `calibrate`: the library's one call for what `lamella calibrate` does, with the calibration
 * record in memory (write it as JSON to use it with `mapPhoto`'s and the CLI's calibration).
 */
import { resolveStack } from '../optics/index.js';
import type { Stack } from '../optics/types.js';
import { calibrateDecoded, calibratePhotoFile, type CalibrateOptions, type CalibrationRecord } from '../calibrate/calibrate.js';
import { DEFAULT_CALIBRATION_FIT } from '../calibrate/fitCalibration.js';
import { photoFromInput, type PhotoInput, type PhotoInputOptions } from './photoInput.js';

export type CalibratePhotoOptions = Omit<CalibrateOptions, 'stack' | 'stackSpec' | 'fit' | 'angleRad'> &
  PhotoInputOptions & {
    /** What to fit (default, as the CLI: exposure, flare, white balance and the camera's response). */
    readonly fit?: CalibrateOptions['fit'];
    /** Viewing angle in the ambient medium (default 0). */
    readonly angleRad?: number;
    /** The film stack: a preset name, a stack file, or a resolved Stack (then give `stackSpec` to record what it was). */
    readonly stack: Stack | string;
    readonly stackSpec?: string;
  };

/**
 * Fits the photo formation (exposure, white balance, flare; the camera's response and a light
 * field when asked and supported) from regions of known thickness in a reference photo.
 *
 * @param input a photo file's path, the bytes of a photo file, or a decoded photo
 * @param options the film, the light, and `known`: the rectangles of known thickness
 * @returns the calibration record (the calibration file's content)
 * @example
 * const record = await calibrate('steps.jpg', { stack: 'oxide-on-silicon', light: 'F11', known: [{ region: [10, 10, 40, 40], thicknessNm: 120 }] });
 */
export async function calibrate(input: PhotoInput, options: CalibratePhotoOptions): Promise<CalibrationRecord> {
  const stackSpec = options.stackSpec ?? (typeof options.stack === 'string' ? options.stack : options.stack.name);
  const stack = typeof options.stack === 'string' ? resolveStack(options.stack) : options.stack;
  const { name: _name, allowDamaged: _allowDamaged, ...rest } = options;
  const calibrateOptions: CalibrateOptions = { ...rest, stack, stackSpec, fit: options.fit ?? DEFAULT_CALIBRATION_FIT, angleRad: options.angleRad ?? 0 };
  if (typeof input === 'string' && !options.allowDamaged) return calibratePhotoFile(input, calibrateOptions);
  const { photo, name } = await photoFromInput(input, options);
  return calibrateDecoded(photo.rgb, photo.width, photo.height, name, calibrateOptions);
}
