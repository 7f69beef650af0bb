/**
 * `chart`: the library's one call for what `lamella chart` does — the interference colours of a
 * film over a thickness range, as a table in memory and as the file's bytes (CSV, JSON or PNG).
 */
import type { Light } from '../colour/light.js';
import { resolveLight } from '../colour/lights.js';
import type { ObserverName } from '../colour/observers.js';
import { resolveStack } from '../optics/resolveStack.js';
import type { Polarisation, Stack } from '../optics/types.js';
import { chartCsv, chartPng, chartRecord, chartSettings, type ChartSettings } from '../render/chartFiles.js';
import { chartTable, type ChartTable } from '../render/chartTable.js';

export type ChartFormat = 'csv' | 'json' | 'png';

export interface ChartJobOptions {
  /** The film stack: a preset name, a stack file, or a resolved Stack. */
  readonly stack: Stack | string;
  /** The light the film is seen under: a name (`D65`, `F11`, `blackbody:3200`, …), an SPD file, or a Light. */
  readonly light: Light | string;
  /** The light the camera was white-balanced for, if not `light`. */
  readonly whiteBalance?: Light | string;
  /** Angle of incidence in the ambient (default 0). */
  readonly angleRad?: number;
  readonly observer?: ObserverName;
  readonly polarisation?: Polarisation;
  /** Thickness range, nm (default 0–1500 every 1). */
  readonly fromNm?: number;
  readonly toNm?: number;
  readonly stepNm?: number;
  /** Gain on the recorded colours (default 1), or 'auto': the brightest swatch at full scale. */
  readonly exposure?: number | 'auto';
  /** Which file to make (default csv). */
  readonly format?: ChartFormat;
  /** PNG pixel density factor, 1–4 (1: 1240 px wide). */
  readonly resolution?: number;
}

export interface ChartResult {
  readonly table: ChartTable;
  readonly settings: ChartSettings;
  readonly format: ChartFormat;
  /** The file's content: UTF-8 text for csv and json, PNG bytes for png. */
  readonly bytes: Uint8Array;
}

/**
 * Computes a thickness–colour chart and the file `lamella chart` would write.
 *
 * @param options the film, the light, the thickness range and the format
 * @returns the table (XYZ, CIELAB, 8-bit sRGB, interference order per thickness), its settings and the file's bytes
 * @throws RangeError for a bad thickness range or resolution; DataFileError for a bad stack, material or SPD file
 * @example
 * const { bytes } = await chart({ stack: 'oxide-on-silicon', light: 'F11', toNm: 800, format: 'png' });
 */
export async function chart(options: ChartJobOptions): Promise<ChartResult> {
  const format = options.format ?? 'csv';
  const resolution = options.resolution ?? 1;
  if (!(resolution >= 1 && resolution <= 4)) throw new RangeError(`resolution must be a pixel-density factor from 1 to 4, received ${resolution}`);
  const stack = typeof options.stack === 'string' ? resolveStack(options.stack) : options.stack;
  const light = typeof options.light === 'string' ? resolveLight(options.light) : options.light;
  const whiteBalance = typeof options.whiteBalance === 'string' ? resolveLight(options.whiteBalance) : options.whiteBalance;
  const angleRad = options.angleRad ?? 0;
  const observer = options.observer ?? '1931';
  const polarisation = options.polarisation ?? 'mixed';
  const table = chartTable({ stack, light, whiteBalance, angleRad, observer, polarisation, fromNm: options.fromNm, toNm: options.toNm, stepNm: options.stepNm, exposure: options.exposure });
  const settings = chartSettings(table, { stack, light, whiteBalance, angleRad, polarisation, observer });
  const bytes =
    format === 'csv'
      ? Buffer.from(chartCsv(table), 'utf8')
      : format === 'json'
        ? Buffer.from(`${JSON.stringify(chartRecord(table, settings), null, 1)}\n`, 'utf8')
        : await chartPng(table, settings, resolution);
  return { table, settings, format, bytes };
}
