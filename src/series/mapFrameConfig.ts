/**
 * Settings of the real frame processor (./mapFrameProcessor.ts) as plain JSON, and the URL
 * worker threads load it from. A stack holds functions and cannot cross a thread boundary, so
 * each worker rebuilds it from the same CLI stack options.
 */
import type { StackCliOptions } from '../optics/stackSettings.js';
import type { ExposureParameters, FilmAreaMode, FixedExposureField } from '../map/types.js';
import type { InspectOptions } from '../inspect/inspectMap.js';

export interface MapFrameConfig {
  readonly stackOptions: StackCliOptions;
  readonly light: string;
  readonly whiteBalanceLight: string | null;
  /** `--camera`: srgb, linear or a sensitivities CSV path (absent = srgb). */
  readonly camera?: string;
  readonly thinBelowNm: number | null;
  readonly maxThicknessNm: number;
  readonly filmIndexScale: number | null;
  readonly exposureFixed: ExposureParameters | null;
  /** The calibration's light field (MapOptions.exposureFieldFixed), if any. */
  readonly exposureFieldFixed?: FixedExposureField | null;
  /** `--range`: the colour range of the frame previews [min, max] nm (absent: each frame's own, redrawn in the series' range at aggregation). */
  readonly rangeNm?: readonly [number, number] | null;
  /** `--light-field` (MapOptions.lightField; absent = auto). */
  readonly lightField?: 'auto' | 'off';
  /** Film area, as for `lamella map`: a rectangle x, y, w, h or a mask image path (optional). */
  readonly region?: readonly [number, number, number, number] | null;
  readonly maskPath?: string | null;
  readonly anchors?: ReadonlyArray<{ readonly x: number; readonly y: number; readonly thicknessNm: number }>;
  readonly pixelSizeUm?: number | null;
  /** Map damaged frames as far as they decode (`--allow-damaged`). */
  readonly allowDamaged?: boolean;
  /** `--film-area` and `--expect`, as for `lamella map` (MapOptions.filmArea, expectNm). */
  readonly filmArea?: FilmAreaMode;
  readonly expectNm?: readonly [number, number] | null;
  /** `--spec`, `--pass-if`, `--edge-exclusion`, `--part-*`: each frame's inspection (src/inspect; no points or profiles). */
  readonly inspect?: Pick<InspectOptions, 'spec' | 'passIf' | 'edgeExclusionMm' | 'part'> | null;
}

/** Module URL of the real processor, for `ProcessorSource.moduleUrl`. */
export const MAP_FRAME_PROCESSOR_URL: string = new URL('./mapFrameProcessor.js', import.meta.url).href;
