/**
 * The camera a photo was taken with, as one plain string that crosses thread boundaries and goes
 * into settings hashes and records: `srgb` (the default: pixel values sRGB-encoded, as JPEGs and
 * ordinary PNG/TIFF are), `linear` (values proportional to light, sRGB primaries: scientific
 * cameras, raw converters' linear 16-bit output), or the path of a CSV of a raw camera's spectral
 * sensitivities `wavelength_nm,r,g,b` (linear output in the camera's own channels).
 */
import { buildCamera, type Camera } from './camera.js';
import type { Light } from './light.js';
import type { ObserverName } from './observers.js';
import { readCameraSensitivities } from './readCameraSensitivities.js';

export type CameraSpec = string;

export const CAMERA_MODES = ['srgb', 'linear'] as const;

/** Is the spec a sensitivities file (anything but the two mode names)? */
export function isCameraFile(spec: CameraSpec | null | undefined): boolean {
  return spec !== undefined && spec !== null && spec !== 'srgb' && spec !== 'linear';
}

/** The camera model for a spec (reads the sensitivities CSV for a file spec). */
export function cameraFromSpec(spec: CameraSpec | null | undefined, light: Light, whiteBalance?: Light, observer?: ObserverName): Camera {
  const mode = spec ?? 'srgb';
  if (mode === 'srgb') return buildCamera({ light, whiteBalance, observer });
  if (mode === 'linear') return buildCamera({ light, whiteBalance, observer, linear: true });
  return buildCamera({ light, whiteBalance, observer, sensitivities: readCameraSensitivities(mode) });
}
