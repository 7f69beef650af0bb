/**
 * Defaults of a map that the CLI and the library share (README, "map"): the thin (rupture-risk)
 * threshold is 50 nm for the `soap-film` preset and none for other stacks; thicknesses up to
 * 2000 nm are considered.
 */
export const DEFAULT_MAX_THICKNESS_NM = 2000;
const SOAP_FILM_THIN_BELOW_NM = 50;

/** The default thin threshold for a stack given by preset name or file (null: none). */
export function defaultThinBelowNm(stack: unknown): number | null {
  return stack === 'soap-film' ? SOAP_FILM_THIN_BELOW_NM : null;
}
