/**
 * Contract of the thickness mapper (`src/map`): options in, result out. Series processing,
 * calibration, the monochromatic mode and the report all build on these records.
 */
import type { Stack } from '../optics/types.js';
import type { CameraResponse } from '../colour/toneResponse.js';

/** The stages of a map, in order (MapOptions.onPhase). */
export type MapPhase = 'fit' | 'orders' | 'pixels' | 'summaries';

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
  /**
   * Found not to be film by the automatic film area (`--film-area auto`): dark surroundings,
   * frames and wires, holders, labels, glints, colours no thickness gives (src/map/filmArea.ts).
   */
  notFilm: 6,
  /**
   * Dark pixels the film-area search cannot place: black film or dark surroundings (e.g. a film
   * cut by the photo border with black at that border). Neither thin nor film in the statistics.
   */
  undecided: 7,
} as const;
export type PixelStatusCode = (typeof PixelStatus)[keyof typeof PixelStatus];

/** How the film area is chosen: found automatically (default), or every pixel in region/mask. */
export type FilmAreaMode = 'auto' | 'whole';

/** Why pixels are not part of the film area, in pixels (JSON `film_area.excluded_px`). */
export interface FilmAreaExclusions {
  /** Outside `--region` / `--mask`, or transparent in the photo. */
  readonly outside_region: number;
  /** Dark surroundings: too dark to measure and outside the film's outline. */
  readonly dark_surroundings: number;
  /** Colours no thickness of this film can give under the fitted light (frames, holders, labels, backgrounds). */
  readonly not_film_colour: number;
  /** Clipped highlights outside the film or joined to what is not film (lamp glints). */
  readonly glint: number;
  /** Small specks whose colour matches a film by chance, apart from the film. */
  readonly isolated: number;
  /** Dark pixels that could be black film or background (see PixelStatus.undecided). */
  readonly undecided: number;
}

/** The film area of one photo. */
export interface FilmAreaSummary {
  readonly mode: FilmAreaMode;
  /** Film pixels (every status but excluded, notFilm and undecided). */
  readonly areaPx: number;
  /** areaPx / all pixels of the photo. */
  readonly fraction: number;
  readonly areaUm2: number | null;
  /** False when the photo holds no film (warning "no film found"; no statistics). */
  readonly found: boolean;
  readonly excludedPx: FilmAreaExclusions;
}

/** How well the fitted model explains the film's colours (JSON `fit_quality`). */
export interface FitQuality {
  /** Median ΔE2000 (CIEDE2000) between photo and model over measured film pixels. */
  readonly median_delta_e2000: number | null;
  /** 95th percentile of the same. */
  readonly p95_delta_e2000: number | null;
  /** Share of film pixels whose colour matches no thickness (no estimate for that reason). */
  readonly unmatched_fraction: number;
  /** 'good' | 'fair' | 'poor' by the thresholds in src/map/fitQuality.ts. */
  readonly verdict: 'good' | 'fair' | 'poor';
}

export interface Anchor {
  readonly x: number;
  readonly y: number;
  readonly thicknessNm: number;
}

/**
 * Photo-formation parameters: encoded = R(encode(exposure · wb_c · rgbLinear_c(d) + flare_c)),
 * R the camera's response (picture style: tone curve and saturation, ../colour/toneResponse.ts).
 */
export interface ExposureParameters {
  readonly exposure: number;
  readonly whiteBalance: readonly [number, number, number];
  readonly flare: readonly [number, number, number];
  /** The camera's response; absent or null = the identity (pixel values are plain sRGB). */
  readonly response?: CameraResponse | null;
  /** Where the response came from (absent = identity, nothing fitted). */
  readonly responseSource?: 'photo' | 'calibration' | 'identity';
}

export interface MapOptions {
  readonly stack: Stack;
  readonly angleRad: number;
  /** Light spec as the CLI takes it: `D65`, `F11`, `blackbody:3200`, `line:546`, or an SPD file. */
  readonly light: string;
  /** Camera white balance left at another light (spec as for `light`), if any. */
  readonly whiteBalanceLight?: string | null;
  /** The camera: `srgb` (default), `linear` or a sensitivities CSV path (../colour/cameraSpec.ts). */
  readonly camera?: string | null;
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
   * Previous frame's pixel statuses (PixelStatus, same size) in a series: with `--film-area auto`
   * its film area is this frame's prior (src/map/priorFilmArea.ts, filmArea.ts).
   */
  readonly priorStatus?: Uint8Array | null;
  /**
   * Previous frame's fitted photo formation, where a series starts this frame's fit (instead of
   * the exposure scan); ignored with `exposureFixed`.
   */
  readonly fitStart?: ExposureParameters | null;
  /**
   * A series frame: fit the photo formation the same way whatever came before (a cold fit on a
   * subsample, finished on all samples; ../map/fitPhotoFormation.ts), so a frame's result does not
   * depend on where its chunk starts. `fitStart` then only competes: it is used when it explains
   * this photo clearly better. Default false (`lamella map`: the full cold fit).
   */
  readonly ownFit?: boolean;
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
  /**
   * Told when each stage of a map starts: the photo-formation fit, the order resolution, the
   * per-pixel pass, the summaries (a photo under uneven light goes through them once per round of
   * its light field). For a display of progress; the map does not depend on it.
   */
  readonly onPhase?: ((phase: MapPhase) => void) | null;
  /** `auto` (default): find the film area; `whole`: every pixel in region/mask is film. */
  readonly filmArea?: FilmAreaMode;
  /** `auto` (default): fit the exposure as a smooth field when the light is uneven (./lightField.ts); `off`: one exposure. */
  readonly lightField?: 'auto' | 'off';
  /**
   * A light field fixed by a calibration (src/calibrate): divided out of the photo before the
   * map, not refitted. Its photo size must match the photo's unless `ignoreSizeMismatch`.
   */
  readonly exposureFieldFixed?: FixedExposureField | null;
  /**
   * Previous frame's fitted light field (log-gain coefficients) in a series: this frame starts
   * from it and refines it; ignored with `exposureFieldFixed`.
   */
  readonly fieldStart?: readonly number[] | null;
  /**
   * Map a large photo (over 1 MP) at full size first, and fit the light field on its preview only
   * when that map finds the light uneven (./lightField.ts). A series sets it for a frame whose
   * previous frame was evenly lit (no `fieldStart`): the lamp rarely changes between frames, and
   * the preview map (about a third of a 2-MP frame's work) is then skipped. Default false: a large
   * photo's light is measured on its preview, whose fit the full map then takes.
   */
  readonly fullSizeFirst?: boolean;
  /**
   * `--expect MIN-MAX`: the thickness range the film is known to lie in (nm); orders and the fit
   * are restricted to it; pixels that fit only outside it are reported, not forced.
   */
  readonly expectNm?: readonly [number, number] | null;
}

/**
 * The exposure as a smooth field over the photo (./lightField.ts): relative gain
 * exp(Σ c_k·b_k(u, v)) on the basis 1, u, v, u², uv, v², r⁴ of ./lightEvenness.ts (`relativeGainAt`).
 */
export interface ExposureField {
  readonly logGainCoefficients: readonly number[];
  /** Lowest and highest relative gain over the photo's film (median 1; 1st/99th percentiles). */
  readonly gainMin: number;
  readonly gainMax: number;
  /** Alternation rounds run on this photo (0 for a field applied from a calibration). */
  readonly rounds: number;
  /** Where the field came from: fitted on this photo, or a calibration file applied as it is. */
  readonly source: 'photo' | 'calibration';
}

/** A calibration's light field, as `map --calibration` applies it. */
export interface FixedExposureField {
  readonly logGainCoefficients: readonly number[];
  /** Size of the photo the field was fitted on. */
  readonly widthPx: number;
  readonly heightPx: number;
  /** The calibration file (for messages). */
  readonly file: string;
  /** Apply it to a photo of another size anyway (on the photo's normalised coordinates). */
  readonly ignoreSizeMismatch: boolean;
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
  /** Pixels of the film area (the statistics' population). */
  readonly film_area_px: number;
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
  /** The film area (absent only in results made before film areas existed). */
  readonly filmArea?: FilmAreaSummary;
  /** How well the model explains the film's colours; null when nothing was measured. */
  readonly fitQuality?: FitQuality | null;
  /** How evenly the film was lit, relative to the one fitted exposure (./lightEvenness.ts); null when not measured. */
  readonly lightEvenness?: { readonly gainMin: number; readonly gainMax: number; readonly pixelsUsed: number; readonly logGainCoefficients: readonly number[] } | null;
  /** The exposure fitted as a smooth field for uneven light, null when one exposure was used. */
  readonly exposureField?: ExposureField | null;
}
