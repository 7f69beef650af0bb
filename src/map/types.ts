/**
 * Contract of the thickness mapper (`src/map`): options in, result out. Series processing,
 * calibration, the monochromatic mode and the report all build on these records.
 */
import type { Stack } from '../optics/types.js';

/** Per-pixel status codes stored alongside the thickness map. */
export const PixelStatus = {
  ok: 0,
  /** Too dark to measure: "thinner than the first-order limit, or no film" (counted as thin). */
  dark: 1,
  /** Colours washed out (film thicker than white-light colours can resolve). */
  tooThick: 2,
  /** Colour matches no thickness well, or orders cannot be told apart: no estimate. */
  ambiguous: 3,
  /** Outside the region or mask, or transparent in the photo. */
  excluded: 4,
  /** Clipped / saturated channels. */
  saturated: 5,
} as const;
export type PixelStatusCode = (typeof PixelStatus)[keyof typeof PixelStatus];

export interface Anchor {
  readonly x: number;
  readonly y: number;
  readonly thicknessNm: number;
}

/** Photo-formation parameters: encoded = encode(exposure · wb_c · rgbLinear_c(d) + flare_c). */
export interface ExposureParameters {
  readonly exposure: number;
  readonly whiteBalance: readonly [number, number, number];
  readonly flare: readonly [number, number, number];
}

export interface MapOptions {
  readonly stack: Stack;
  readonly angleRad: number;
  /** Light spec as the CLI takes it: `D65`, `F11`, `blackbody:3200`, `line:546`, or an SPD file. */
  readonly light: string;
  /** Camera white balance left at another light (spec as for `light`), if any. */
  readonly whiteBalanceLight?: string | null;
  readonly filmIndexScale?: number;
  readonly thinBelowNm: number | null;
  /** x, y, width, height in pixels of the upright photo. */
  readonly region?: readonly [number, number, number, number] | null;
  /** Mask image path: non-zero pixels are film. */
  readonly maskPath?: string | null;
  readonly anchors?: readonly Anchor[];
  readonly maxThicknessNm: number;
  readonly pixelSizeUm?: number | null;
  /** Fixed photo-formation parameters from a calibration file (skips their fit when given). */
  readonly exposureFixed?: ExposureParameters | null;
  /** Previous frame's thickness map (same size) used as an order prior in a series. */
  readonly prior?: Float32Array | null;
  /**
   * Previous frame's fitted photo formation, where a series starts this frame's fit (instead of
   * the exposure scan); ignored with `exposureFixed`.
   */
  readonly fitStart?: ExposureParameters | null;
  /**
   * Keep poor colour matches that agree with the smooth field of their well-matched neighbours
   * (src/map/keepConsistent.ts); default true. False: the colour test alone decides.
   */
  readonly keepConsistent?: boolean;
  /**
   * Threads for the per-pixel pass of photos of 1 MP or more (the calling thread plus helper
   * worker threads); default: the available cores, at most 4. The map is the same whatever the count.
   */
  readonly threads?: number;
}

export interface ThinRegion {
  readonly id: number;
  readonly areaPx: number;
  readonly areaUm2: number | null;
  readonly centroidX: number;
  readonly centroidY: number;
  /** Minimum measured thickness in the region; null when all of it is too dark to measure. */
  readonly minThicknessNm: number | null;
  readonly bbox: readonly [number, number, number, number];
}

export interface MapStatistics {
  readonly mean_nm: number | null;
  readonly median_nm: number | null;
  readonly std_nm: number | null;
  readonly min_nm: number | null;
  readonly max_nm: number | null;
  readonly p05_nm: number | null;
  readonly p95_nm: number | null;
  /** (p95 − p05) / median, a common uniformity figure for coatings (common practice). */
  readonly uniformity: number | null;
  /** Share of film pixels (region/mask, else the frame) with a thickness estimate. */
  readonly coverage: number;
  /** Share of film pixels below the thin threshold, dark pixels counted as thin. */
  readonly thin_fraction: number | null;
  readonly thin_regions: number;
}

export interface MapResult {
  readonly width: number;
  readonly height: number;
  /** Row-major, nm, NaN where there is no estimate. */
  readonly thicknessNm: Float32Array;
  /** Row-major, 0..1, 0 where there is no estimate. */
  readonly confidence: Float32Array;
  /** Row-major PixelStatus codes. */
  readonly status: Uint8Array;
  readonly fitted: ExposureParameters & { readonly residualDeltaE?: number };
  readonly stats: MapStatistics;
  readonly histogram: { readonly edgesNm: number[]; readonly counts: number[] };
  readonly thinRegions: readonly ThinRegion[];
  readonly darkLimitNm: number;
  readonly warnings: readonly string[];
  /** Per-pixel thin-region id (0 = none), for the flags image. */
  readonly thinLabels?: Int32Array;
}
