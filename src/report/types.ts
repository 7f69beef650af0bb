/**
 * Contract of the HTML report (`src/report`): what `lamella map` and `lamella series` hand over.
 * Everything is plain data; the report embeds it into one self-contained HTML file.
 */

export interface ReportGrid {
  /** Downsampled grid actually embedded (cells). */
  width: number;
  height: number;
  /** Factor from the original image: original pixel (x,y) = grid cell (floor(x/step), floor(y/step)). */
  step: number;
  originalWidth: number;
  originalHeight: number;
  /** Row-major, nm; NaN = no estimate. */
  thicknessNm: Float32Array;
  /** Row-major, 0..1; NaN = no estimate. */
  confidence: Float32Array;
  /** Optional: row-major pixel status codes (`PixelStatus` of `src/map/types.ts`); the readout names them. */
  status?: Uint8Array;
}

export interface ThinRegionRow {
  id: number;
  areaPx: number;
  /** Widened from the brief's `number` to accept the map's `null` (no pixel size). */
  areaUm2?: number | null;
  centroidX: number;
  centroidY: number;
  minThicknessNm: number | null;
  /**
   * Bounding box in ORIGINAL image pixels. Read as `[x, y, width, height]` (as `region` in
   * `MapOptions`) unless `bboxFormat` says `'corners'` (`[xMin, yMin, xMax, yMax]`, inclusive).
   */
  bbox: readonly [number, number, number, number];
  /** Optional: how to read `bbox`; default `'xywh'`. */
  bboxFormat?: 'xywh' | 'corners';
}

export interface MapReportInput {
  title: string;
  /** ISO time. */
  generatedAt: string;
  /** PNG bytes, already downsampled by the caller to ≤ ~1200 px. */
  photoPng: Buffer;
  mapPng: Buffer;
  colourBar: { minNm: number; maxNm: number; stops: Array<{ nm: number; hex: string }> };
  grid: ReportGrid;
  thinBelowNm: number | null;
  /** mean_nm, median_nm, std_nm, min_nm, max_nm, p05_nm, p95_nm, uniformity, coverage. */
  stats: Record<string, number | null>;
  histogram: { edgesNm: number[]; counts: number[] };
  thinRegions: ThinRegionRow[];
  settings: Record<string, unknown>;
  fitted: Record<string, unknown>;
  calibration?: Record<string, unknown> | null;
  warnings: string[];
  downsampleNote?: string;
  /** Optional: column (original pixels) of the default vertical profile; default the centre. */
  profileColumn?: number;
  /** Optional: the film area (absent for maps made before film areas); `found: false` = no film in the photo. */
  filmArea?: ReportFilmArea | null;
  /** Optional: how well the model explains the film's colours (the JSON `fit_quality`). */
  fitQuality?: ReportFitQuality | null;
  /** Optional: the light field and the light's evenness (the JSON `exposure_field`, `light_evenness`). */
  light?: ReportLight | null;
  /** Optional: the map record's JSON `inspection` block (spec, verdict, uniformity; src/inspect). */
  inspection?: Record<string, unknown> | null;
}

/** The light on the film: the exposure field sampled on a coarse grid over the photo, and the evenness left. */
export interface ReportLight {
  field: {
    gridWidth: number;
    gridHeight: number;
    /** Row-major relative gain at the centre of each grid cell (median over the film = 1). */
    relativeGain: number[];
    gainMin: number;
    gainMax: number;
    rounds: number;
    source: 'photo' | 'calibration';
  } | null;
  evenness: { gainMin: number; gainMax: number } | null;
}

/** The film area of a map, as in the JSON `film_area` block (`FilmAreaSummary` of src/map/types.ts). */
export interface ReportFilmArea {
  mode: 'auto' | 'whole';
  areaPx: number;
  /** Share of the photo's pixels. */
  fraction: number;
  areaUm2: number | null;
  found: boolean;
  /** Pixels left out, by reason (outside_region, dark_surroundings, not_film_colour, glint, isolated, undecided). */
  excludedPx: Record<string, number>;
}

/** As the JSON `fit_quality` block. */
export interface ReportFitQuality {
  median_delta_e2000: number | null;
  p95_delta_e2000: number | null;
  unmatched_fraction: number;
  verdict: 'good' | 'fair' | 'poor';
}

export interface SeriesFrameRow {
  frame: string;
  timeS: number;
  meanNm: number | null;
  medianNm: number | null;
  minNm: number | null;
  thinFraction: number | null;
  thinRegions: number;
  /** Share of the film area with an estimate; null for a frame without film. */
  coverage: number | null;
  /** Optional: pixels of the film area (0 without film), null when unknown. */
  filmAreaPx?: number | null;
  /** Optional: false when the frame's map found no film. */
  filmFound?: boolean;
  /** Small thumbnail map for the slider, optional. */
  mapPng?: Buffer;
  /** Optional: the flow overlay from this frame to the next (arrows over its thickness map, `lamella flow`); shown in the slider instead of the thumbnail. */
  flowPng?: Buffer;
}

/** The flow of a series (`lamella flow` into OUT/flow): per frame pair, its summary. */
export interface SeriesFlowView {
  /** Velocity unit, "px/s" or "µm/s". */
  unit: string;
  pairs: Array<{ frame: string; nextFrame: string; timeS: number; dtS: number; meanSpeed: number | null; p95Speed: number | null; meanUp: number | null; coverage: number }>;
  /** Thin patches tracked (patches.csv). */
  patches: number;
}

/** When the film of a series ruptured: the last frame with film and the first without. */
export interface SeriesRupture {
  lastFrame: string;
  firstFrame: string;
  lastTimeS: number;
  firstTimeS: number;
  /** Midpoint of the two. */
  timeS: number;
}

export interface DrainageFitSummary {
  model: string;
  formula: string;
  parameters: Record<string, { value: number; uncertainty: number | null }>;
  rSquared: number | null;
  /** (time_s, thickness_nm) samples of the fitted curve. */
  curve: Array<[number, number]>;
  crossing?: {
    quantity: 'mean' | 'min';
    timeS: number | null;
    lowS: number | null;
    highS: number | null;
    extrapolated: boolean;
    /** Optional: the fitted curve would reach the threshold only after the rupture (no time predicted). */
    beyondRupture?: boolean;
  } | null;
}

export interface SeriesReportInput {
  title: string;
  generatedAt: string;
  frames: SeriesFrameRow[];
  thinBelowNm: number | null;
  fits: DrainageFitSummary[];
  settings: Record<string, unknown>;
  calibration?: Record<string, unknown> | null;
  warnings: string[];
  /** Optional: the rupture of the film (a marker on the charts, a headline line); null or absent: none. */
  rupture?: SeriesRupture | null;
  /** The full map view for the last (or a chosen) frame. */
  lastMap?: MapReportInput;
  /** Optional: what the frames observed and the reliable predictions (`series.json` `observations`); they lead the page. */
  observations?: ReportSeriesObservations | null;
  /** Optional: the series' flow (a flow view: arrows in the frame slider, speed against time). */
  flow?: SeriesFlowView | null;
}

/** As `series.json` `observations` (src/series/observations.ts). */
export interface ReportSeriesObservations {
  first_thin: { frame: string; time_s: number } | null;
  recent_thinning: { rate_nm_per_s: number; standard_error_nm_per_s: number | null; frames: number; from_s: number; to_s: number } | null;
  predictions: ReadonlyArray<{ quantity: 'mean' | 'min'; threshold_nm: number; time_s: number | null; range_s: readonly [number, number] | null; extrapolated: boolean; reason: string | null }>;
}
