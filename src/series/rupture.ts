/**
 * When the film of a series ruptured, from the aggregated rows (so a sharded run and a single run
 * give the same record). A frame has film when its map found a film area (`filmArea.found`,
 * src/map/types.ts); frames that failed or have no result are not in the rows and are evidence
 * neither way. The rupture lies between the last frame with film and the next frame with a
 * result, provided that frame and every later one have no film: the film is gone for good.
 * Film that comes back after a frame without it (a new film drawn, or a misdetection) does not
 * move the rupture; the first such gap is named in a warning.
 */
import type { SeriesRow } from './seriesRows.js';

/** `series.json` `rupture`: frame names and times (s from the first frame) either side of it. */
export interface RuptureRecord {
  readonly last_frame_with_film: string;
  readonly first_frame_without_film: string;
  readonly last_time_s: number;
  readonly first_time_s: number;
  /** first_time_s − last_time_s: how precisely the series fixes the moment. */
  readonly interval_s: number;
  /** Midpoint of the interval, the best single estimate of the rupture time. */
  readonly time_s: number;
  /** The rule in words, so that a reader of the JSON knows what the frames mean. */
  readonly rule: string;
}

export interface RuptureFinding {
  readonly rupture: RuptureRecord | null;
  /** Index into the rows of the last frame with film (the fits stop there); -1 when none has film. */
  readonly lastFilmIndex: number;
  readonly warnings: string[];
}

export const RUPTURE_RULE =
  'the first frame without film (no film area found) after the last frame with film; no later frame has film; frames that failed or have no result are not evidence';

/** A row's film: found unless its record says the map found none (older records: found). */
export function rowHasFilm(row: SeriesRow): boolean {
  return row.filmFound !== false;
}

/** Rows in input (time) order. */
export function findRupture(rows: readonly SeriesRow[]): RuptureFinding {
  const warnings: string[] = [];
  let lastFilmIndex = -1;
  for (let i = rows.length - 1; i >= 0; i--) {
    if (rowHasFilm(rows[i])) {
      lastFilmIndex = i;
      break;
    }
  }
  if (rows.length > 0 && lastFilmIndex === -1) {
    warnings.push(`no film found in any of the ${rows.length} frame(s) with results: no drainage curve and no rupture`);
    return { rupture: null, lastFilmIndex, warnings };
  }
  // The first gap after film with film again later: frames i0..i1 without film between film frames.
  let seenFilm = false;
  for (let i = 0; i < lastFilmIndex; i++) {
    if (rowHasFilm(rows[i])) {
      seenFilm = true;
      continue;
    }
    if (!seenFilm) continue;
    let end = i;
    while (end + 1 < rows.length && !rowHasFilm(rows[end + 1])) end++;
    const gap = end === i ? `frame ${rows[i].frame}` : `frames ${rows[i].frame} … ${rows[end].frame} (${end - i + 1} frames)`;
    warnings.push(
      `film reappears after ${gap} without film: no film after ${rows[i - 1].frame}, film again in ${rows[end + 1].frame} `
      + '(a new film, or a film the detection missed); the rupture is taken where the film is gone for good',
    );
    break;
  }
  if (lastFilmIndex === rows.length - 1 || lastFilmIndex === -1) return { rupture: null, lastFilmIndex, warnings };
  const before = rows[lastFilmIndex];
  const after = rows[lastFilmIndex + 1];
  return {
    rupture: {
      last_frame_with_film: before.frame,
      first_frame_without_film: after.frame,
      last_time_s: before.timeS,
      first_time_s: after.timeS,
      interval_s: after.timeS - before.timeS,
      time_s: (before.timeS + after.timeS) / 2,
      rule: RUPTURE_RULE,
    },
    lastFilmIndex,
    warnings,
  };
}

/** Seconds as a short text: up to 3 decimals, trailing zeros dropped (`12.5`, `0.02`, `3`). */
export function formatSeconds(timeS: number): string {
  const text = timeS.toFixed(3).replace(/\.?0+$/, '');
  return text === '-0' ? '0' : text;
}

/** "Film ruptured between 12.5 s (frame f26.jpg) and 13 s (frame f27.jpg)" */
export function describeRupture(rupture: RuptureRecord): string {
  return `Film ruptured between ${formatSeconds(rupture.last_time_s)} s (frame ${rupture.last_frame_with_film}) `
    + `and ${formatSeconds(rupture.first_time_s)} s (frame ${rupture.first_frame_without_film})`;
}
