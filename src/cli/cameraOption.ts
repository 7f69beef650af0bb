/**
 * `--camera srgb|linear|FILE.csv` for map, calibrate and series (one parser): a mode name, or a
 * readable CSV of spectral sensitivities `wavelength_nm,r,g,b`. Anything else is a usage error
 * (exit 2) naming the option and what is wrong.
 */
import { CAMERA_MODES, readCameraSensitivities, type CameraSpec } from '../colour/index.js';
import { UsageError } from './errors.js';

export const CAMERA_HELP = 'how pixel values relate to light: srgb (default; JPEG and ordinary photos), linear (proportional to light, sRGB primaries: linear 16-bit TIFF from a raw converter), or a CSV of the camera\'s spectral sensitivities wavelength_nm,r,g,b';

export function parseCameraOption(value: string | undefined): CameraSpec {
  if (value === undefined) return 'srgb';
  if ((CAMERA_MODES as readonly string[]).includes(value)) return value;
  if (value.trim() === '') throw new UsageError('--camera must be srgb, linear or a CSV file of spectral sensitivities, received an empty value');
  try {
    readCameraSensitivities(value);
  } catch (error) {
    const detail = error instanceof Error ? error.message : String(error);
    throw new UsageError(`--camera ${JSON.stringify(value)} is neither srgb, linear nor a usable sensitivities CSV (wavelength_nm,r,g,b): ${detail}`);
  }
  return value;
}
