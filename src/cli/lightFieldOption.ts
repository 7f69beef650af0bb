/**
 * `--light-field auto|off` for `map`, `series` and `calibrate`: whether the exposure may become a
 * smooth field over the photo when the light is uneven (src/map/lightField.ts; in `calibrate`,
 * src/calibrate/fitCalibration.ts), or stays one number.
 */
import type { LightFieldMode } from '../map/lightField.js';
import { UsageError } from './errors.js';

export const LIGHT_FIELD_MODES: readonly LightFieldMode[] = ['auto', 'off'];

export const LIGHT_FIELD_HELP =
  'auto = fit the exposure as a smooth field over the photo when the light falls off across it (reported in the JSON), off = one exposure for the whole photo';

export function parseLightFieldOption(value: string | undefined): LightFieldMode {
  if (value === undefined) return 'auto';
  if ((LIGHT_FIELD_MODES as readonly string[]).includes(value)) return value as LightFieldMode;
  throw new UsageError(`--light-field must be one of ${LIGHT_FIELD_MODES.join(', ')}, received '${value}'`);
}
