/**
 * Labels with units for the report's settings and calibration tables: a record's keys (snake_case
 * with the unit at the end, or the camelCase of in-memory settings and older calibration files)
 * become words a reader understands, and the unit moves beside the value.
 */
import { snakeCase } from '../io/jsonKeys.js';

export interface FieldLabel {
  readonly label: string;
  /** Unit shown after the value (`nm`, `°`, `µm`), or '' for none. */
  readonly unit: string;
  /** A sentence shown as the row's tooltip. */
  readonly help?: string;
}

/** Names whose plain wording is not enough (snake_case key → label, unit, help). */
const KNOWN: Readonly<Record<string, FieldLabel>> = {
  stack: { label: 'Film stack', unit: '' },
  ambient: { label: 'Medium in front of the film', unit: '' },
  substrate: { label: 'Medium behind the film', unit: '' },
  layers: { label: 'Layers', unit: '' },
  light: { label: 'Light', unit: '' },
  white_balance_light: { label: 'Camera white-balanced for', unit: '', help: 'none: for the light itself' },
  camera: { label: 'Camera', unit: '' },
  camera_mode: { label: 'Camera (--camera)', unit: '' },
  angle: { label: 'Angle of incidence', unit: '°' },
  angle_deg: { label: 'Angle of incidence', unit: '°' },
  film_index: { label: 'Film material (--film-index)', unit: '' },
  film_index_scale: { label: 'Film index scale', unit: '×', help: "factor on the film material's refractive index (1 = as tabulated)" },
  thin_below_nm: { label: 'Thin below', unit: 'nm' },
  max_thickness_nm: { label: 'Largest thickness considered', unit: 'nm' },
  region: { label: 'Region x, y, width, height', unit: 'px' },
  mask: { label: 'Mask image', unit: '' },
  anchors: { label: 'Anchors (x, y = thickness)', unit: '' },
  pixel_size_um: { label: 'Pixel size on the sample', unit: 'µm' },
  film_area: { label: 'Film area', unit: '', help: 'auto: found from the photo; whole: every pixel in the region' },
  expect_nm: { label: 'Expected thickness range', unit: 'nm' },
  calibrated: { label: 'Photo formation from a calibration', unit: '' },
  series_prior: { label: 'Previous frame used as order prior', unit: '', help: 'in a series, the previous frame\'s map guides which interference order each region belongs to' },
  light_field: { label: 'Uneven-light correction', unit: '' },
  allow_damaged: { label: 'Damaged photos mapped', unit: '' },
  chunk_frames: { label: 'Frames per chunk', unit: '' },
  time_source: { label: 'Frame times from', unit: '' },
  settings_hash: { label: 'Settings fingerprint', unit: '' },
  preview_range_nm: { label: 'Preview colour range', unit: 'nm' },
  preview_range_source: { label: 'Preview colour range from', unit: '' },
  extrapolate: { label: 'Materials used outside their tabulated range', unit: '' },
  lamella_calibration: { label: 'Calibration file format', unit: '' },
  schema_version: { label: 'JSON form version', unit: '' },
  lamella_version: { label: 'Made by Lamella', unit: '' },
  created: { label: 'Made at', unit: '' },
  photo: { label: 'Photo', unit: '' },
  photo_size_px: { label: 'Photo size (width, height)', unit: 'px' },
  applies_to: { label: 'Made for', unit: '' },
  fitted_parameters: { label: 'Parameters fitted', unit: '' },
  fitted: { label: 'Fitted values', unit: '' },
  exposure: { label: 'Exposure', unit: '×' },
  white_balance: { label: 'White-balance gains R, G, B', unit: '×' },
  flare: { label: 'Flare R, G, B', unit: '', help: 'stray light added to every pixel, linear 0–1 units' },
  response: { label: 'Camera picture style (tone curve)', unit: '' },
  response_note: { label: 'Picture style note', unit: '' },
  contrast: { label: 'Contrast', unit: '' },
  gamma: { label: 'Gamma', unit: '' },
  saturation: { label: 'Saturation', unit: '×' },
  exposure_field: { label: 'Light field (uneven light)', unit: '' },
  log_gain_coefficients: { label: 'Log-gain coefficients', unit: '' },
  standard_errors: { label: 'Standard uncertainties', unit: '' },
  terms: { label: 'Terms', unit: '' },
  fitted_terms: { label: 'Terms fitted', unit: '' },
  relative_gain_min: { label: 'Least relative gain', unit: '×' },
  relative_gain_max: { label: 'Greatest relative gain', unit: '×' },
  model: { label: 'Model', unit: '' },
  note: { label: 'Note', unit: '' },
  uncertainty: { label: 'Standard uncertainties', unit: '' },
  wb_r: { label: 'White balance R', unit: '×' },
  wb_b: { label: 'White balance B', unit: '×' },
  flare_r: { label: 'Flare R', unit: '' },
  flare_g: { label: 'Flare G', unit: '' },
  flare_b: { label: 'Flare B', unit: '' },
  index_scale: { label: 'Film index scale', unit: '×' },
  residual_rms_encoded: { label: 'RMS colour residual', unit: '(encoded 0–1)', help: 'root-mean-square difference between the known regions\' colours and the fitted model, in encoded camera values from 0 to 1' },
  known_regions: { label: 'Known regions', unit: '' },
  region_px: { label: 'Region x, y, width, height', unit: 'px' },
  thickness_nm: { label: 'Thickness', unit: 'nm' },
  residual_delta_e2000: { label: 'Colour residual ΔE2000', unit: '', help: 'about 1 is a just-noticeable difference' },
  warnings: { label: 'Warnings', unit: '' },
  caution: { label: 'Caution', unit: '' },
  provenance: { label: 'Provenance', unit: '' },
  inputs: { label: 'Input files', unit: '' },
  node_version: { label: 'Node.js', unit: '' },
  sha256: { label: 'SHA-256', unit: '' },
  role: { label: 'Role', unit: '' },
  path: { label: 'Path', unit: '' },
  material: { label: 'Material', unit: '' },
  observed_srgb: { label: 'Observed colour (sRGB 0–1)', unit: '' },
  fitted_srgb: { label: 'Model colour (sRGB 0–1)', unit: '' },
  clipped_fraction: { label: 'Share of clipped pixels', unit: '' },
  pixels: { label: 'Pixels', unit: '' },
};

/** Unit suffixes of the JSON convention and the unit they stand for. */
const SUFFIXES: ReadonlyArray<readonly [string, string]> = [
  ['_um2', 'µm²'],
  ['_mm2', 'mm²'],
  ['_nm', 'nm'],
  ['_um', 'µm'],
  ['_mm', 'mm'],
  ['_deg', '°'],
  ['_px', 'px'],
  ['_ms', 'ms'],
  ['_s', 's'],
];

/** The label and unit for a record key (any casing); unknown keys are worded from their name. */
export function fieldLabel(key: string): FieldLabel {
  const name = snakeCase(key);
  const known = KNOWN[name];
  if (known) return known;
  let base = name;
  let unit = '';
  for (const [suffix, symbol] of SUFFIXES) {
    if (base.endsWith(suffix) && base.length > suffix.length) {
      base = base.slice(0, -suffix.length);
      unit = symbol;
      break;
    }
  }
  const words = base.replace(/_/g, ' ').trim();
  return { label: words.charAt(0).toUpperCase() + words.slice(1), unit };
}
