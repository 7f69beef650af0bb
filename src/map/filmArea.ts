/**
 * The film area of a photo, found on the mapper's cell grid (`--film-area auto`).
 *
 * Each cell is first classed by its colour under the fitted photo formation:
 * - film colour: some thickness gives its colour within the noise and model allowance, and it is
 *   not near-black;
 * - darkish: too dark to measure, or matched only by the near-black start of the first order
 *   (black and dark-grey film look like a dark cloth, a chuck or a shadow: colour cannot decide);
 * - saturated (clipped highlights), unexplained (no thickness gives its colour), excluded.
 *
 * Then geometry decides, since a film is a continuous field and its surroundings are not:
 * 1. Film seeds: components of film-colour cells joined only where a candidate thickness of one
 *    continues a candidate of the other (|Δ| ≤ the pixel jump), after an opening that removes
 *    strips a few cells wide (wires, frame edges, tweezers whose grey matches a first-order
 *    grey); components of at least 0.5 % of the search area (and 1/20 of the largest) are film.
 *    The opening is undone within a few cells of the seeds where thickness continues.
 * 2. Darkish components (after an opening that cuts thin dark wires joining a black film to a
 *    dark background) are placed by what they border: black film meets the film through the
 *    first-order sequence (thin film, below one order), a background meets frames, holders and
 *    the photo border. Not touching the photo border: film when at least a quarter of its
 *    outline is thin film, else dark surroundings. Touching the photo border (or the edge of the
 *    region/mask): film when at least 60 % of its outline inside the photo is thin film. When the
 *    film itself runs off the photo too and at least 15 % of the outline is thin film or a
 *    thin-looking band of film colour (a steep black front whose first-order band was cut as a
 *    strip looks exactly like a grey wire before a cloth), it is film in a close-up (coloured film
 *    holds at least half of the photo border), else the evidence cannot decide: undecided (the
 *    caller warns). Otherwise dark surroundings (a cloth around a film held in view).
 * 3. Cells enclosed by the film (unexplained colour mixtures on steep rings, small isolated
 *    matches) belong to it; what is not enclosed is not film (by reason). Clipped cells and a halo
 *    around them (four cells plus the glint's radius) are glints. A cell counts as clipped only when
 *    its clipped pixels are glare, two or more channels at the clipping level (mapPixels.ts): a
 *    vivid film colour that a picture style's saturation boost pushed past the encoding in one
 *    channel is film with a colour no thickness gives, not a glint.
 */
import { type Components, dilateSquare, erodeSquare, labelComponents } from './gridMorphology.js';
import type { FilmAreaExclusions } from './types.js';

export const CellClass = {
  excluded: 0,
  filmColour: 1,
  darkish: 2,
  saturated: 3,
  unexplained: 4,
} as const;

/** Verdict per cell. */
export const CellVerdict = {
  excluded: 0,
  film: 1,
  notFilmColour: 2,
  darkSurroundings: 3,
  glint: 4,
  isolated: 5,
  undecided: 6,
} as const;

export interface FilmAreaInput {
  readonly gridWidth: number;
  readonly gridHeight: number;
  /** CellClass per cell. */
  readonly cellClass: Uint8Array;
  /** Candidate positions per cell (table index units), `perCell` slots, best first. */
  readonly candidatePosition: Float32Array;
  readonly candidateCount: Uint8Array;
  readonly perCell: number;
  /** Largest thickness step between neighbouring cells of one film (table index units). */
  readonly maxJump: number;
  /** Cells whose best candidate lies below this position are first-order (thin) film. */
  readonly thinPosition: number;
  /** Opening radius in cells for the strips test (wires, edges). */
  readonly openingRadius: number;
  /** Chroma of each cell's matched film colour (max − min encoded channel). */
  readonly cellChroma: Float32Array;
  /** The user asserts the film's thickness (anchors, --expect): a neutral field alone is film. */
  readonly filmAsserted: boolean;
  /** Brightness (brightest encoded channel) of each cell's mean colour. */
  readonly cellBrightness: Float32Array;
  /** Cells holding an `--anchor`: what holds an anchor is film. */
  readonly anchorCells: readonly number[];
  /** 1 where a neutral grey surface gives the cell's colour within the noise allowance (neutralGrey.ts). */
  readonly greyExplained: Uint8Array;
  /** The previous frame's film area (a series; priorFilmArea.ts), or null. */
  readonly priorFilm?: Uint8Array | null;
}

export interface FilmAreaCells {
  /** CellVerdict per cell. */
  readonly verdict: Uint8Array;
  readonly found: boolean;
  /** Cells left undecided (dark, at the photo border, bordered by film and by other things). */
  readonly undecidedCells: number;
}

/** Share of the search area (non-excluded cells) a film component must reach. */
const MIN_FILM_SHARE = 0.005;
const MIN_FILM_CELLS = 12;
/** A dark component away from the border is black film when ≥ this share of its outline is thin film. */
const BLACK_FILM_INSIDE = 0.25;
/** At the border: film from this share up, surroundings below UNDECIDED_FROM, undecided between. */
const BLACK_FILM_AT_BORDER = 0.6;
const UNDECIDED_FROM = 0.15;
/** Cells of colour mixtures looked through when judging what a dark region borders. */
const MIXTURE_LOOK_THROUGH = 3;
/** Cells around clipped highlights (beyond their own radius) counted as their glint. */
const GLINT_HALO = 4;
/** Film holds at least this share of the photo border: a close-up of the film. */
const CLOSE_UP_BORDER_SHARE = 0.5;
/** A non-film pocket at the photo border, bounded by film, up to this share of the search area is film. */
const BORDER_POCKET_SHARE = 0.02;
/** ... unless more than this share of it is colours no film gives (dense fringes leave film colours among their mixtures). */
const BORDER_UNEXPLAINED_SHARE = 0.8;

export function findFilmArea(input: FilmAreaInput): FilmAreaCells {
  const { gridWidth: w, gridHeight: h, cellClass } = input;
  const cells = w * h;
  const verdict = new Uint8Array(cells);
  let searchArea = 0;
  for (let c = 0; c < cells; c++) if (cellClass[c] !== CellClass.excluded) searchArea++;

  // 1. Film seeds.
  const colourMask = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) colourMask[c] = cellClass[c] === CellClass.filmColour ? 1 : 0;
  const r = input.openingRadius;
  const opened = r > 0 ? dilateSquare(erodeSquare(colourMask, w, h, r), w, h, r) : colourMask;
  for (let c = 0; c < cells; c++) opened[c] &= colourMask[c];
  const continues = (a: number, b: number): boolean => candidatesContinue(input, a, b);
  const seeds = labelComponents(opened, w, h, 8, continues);
  let largest = 0;
  for (let id = 1; id <= seeds.count; id++) largest = Math.max(largest, seeds.sizes[id]);
  const minSize = Math.max(MIN_FILM_CELLS, MIN_FILM_SHARE * searchArea, largest / 20);
  const { film, dropped } = keepComponents(seeds, input, minSize);
  dropNeutralAttachments(film, dropped, input);
  dropPatchwork(film, dropped, seeds, input);
  // Undo the opening near the seeds where thickness continues (r + 1 steps of conditional growth),
  // but not into neutral surroundings.
  const growable = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) growable[c] = colourMask[c] && !dropped[c] ? 1 : 0;
  growWithin(film, growable, w, h, r + 1, continues);

  // 2. Darkish components.
  const darkMask = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) darkMask[c] = cellClass[c] === CellClass.darkish ? 1 : 0;
  const darkOpened = r > 0 ? dilateSquare(erodeSquare(darkMask, w, h, r), w, h, r) : darkMask.slice();
  for (let c = 0; c < cells; c++) darkOpened[c] &= darkMask[c];
  const dark = labelComponents(darkOpened, w, h, 4);
  const darkVerdict = classifyDark(dark, input, film);
  if (input.priorFilm) followPriorFilm(dark, darkVerdict, input, film);
  for (const c of input.anchorCells) if (dark.labels[c] > 0) darkVerdict[dark.labels[c]] = CellVerdict.film;
  let undecidedCells = 0;
  for (let c = 0; c < cells; c++) {
    const id = dark.labels[c];
    if (id === 0) continue;
    verdict[c] = darkVerdict[id];
    if (darkVerdict[id] === CellVerdict.film) film[c] = 1;
  }
  // Dark cells the opening removed (thin dark lines): film where they touch film and no
  // surroundings, else dark surroundings.
  settleThinDark(darkMask, darkOpened, verdict, film, w, h);

  // 3. Enclosed cells join the film; the rest is not film, by reason.
  // Dark surroundings large enough to be a background (a speck of dirt is no evidence).
  const significantDark = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) if (dark.labels[c] > 0 && dark.sizes[dark.labels[c]] >= minSize) significantDark[c] = 1;
  const enclosed = enclosedByFilm(film, cellClass, verdict, dropped, significantDark, w, h, searchArea);
  for (const c of input.anchorCells) if (cellClass[c] !== CellClass.darkish && cellClass[c] !== CellClass.excluded) film[c] = 1;
  // Undecided dark regions again, now that the film holds its steep fringes at the border too
  // (a close-up of the film decides them).
  if (darkVerdict.includes(CellVerdict.undecided)) {
    const held = film.slice();
    // Only coloured fringes and their colour mixtures count: a grey wire before a cloth would
    // otherwise vouch for the cloth.
    for (let c = 0; c < cells; c++) {
      const k = cellClass[c];
      if (enclosed[c] && (k === CellClass.unexplained || (k === CellClass.filmColour && input.cellChroma[c] >= NEUTRAL_CHROMA))) held[c] = 1;
    }
    if (isCloseUp(held, cellClass, w, h)) {
      for (let c = 0; c < cells; c++) {
        const id = dark.labels[c];
        if (id !== 0 && darkVerdict[id] === CellVerdict.undecided) {
          verdict[c] = CellVerdict.film;
          film[c] = 1;
        }
      }
    } else {
      // Still undecided: what touches them is not vouched for by the film either (a wire between
      // the film and a dark region that may be a cloth).
      for (let c = 0; c < cells; c++) if (verdict[c] === CellVerdict.undecided && significantDark[c]) significantDark[c] = 2;
      enclosed.set(enclosedByFilm(film, cellClass, verdict, dropped, significantDark, w, h, searchArea));
    }
  }
  // A glint's halo (light scattered around a clipped highlight) brightens the film beside it:
  // GLINT_HALO cells around clipped cells are part of the glint.
  const clipped = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) clipped[c] = cellClass[c] === CellClass.saturated ? 1 : 0;
  const glints = labelComponents(clipped, w, h, 8);
  // Single clipped cells (noise at a bright colour) have no halo to speak of; a glint's halo
  // reaches GLINT_HALO cells plus its own radius around it.
  const halo = new Uint8Array(cells);
  const radii = new Map<number, Uint8Array>();
  for (let c = 0; c < cells; c++) {
    if (!clipped[c]) continue;
    const size = glints.sizes[glints.labels[c]];
    if (size < 4) continue;
    const radius = GLINT_HALO + Math.ceil(Math.sqrt(size / Math.PI));
    let mask = radii.get(radius);
    if (!mask) radii.set(radius, (mask = new Uint8Array(cells)));
    mask[c] = 1;
  }
  for (const [radius, mask] of radii) {
    const grown = dilateSquare(mask, w, h, radius);
    for (let c = 0; c < cells; c++) halo[c] |= grown[c];
  }
  let found = false;
  for (let c = 0; c < cells; c++) {
    const k = cellClass[c];
    if (halo[c] && k !== CellClass.excluded) {
      verdict[c] = CellVerdict.glint;
      continue;
    }
    if (k === CellClass.excluded) {
      verdict[c] = CellVerdict.excluded;
      continue;
    }
    if (film[c] || (enclosed[c] && k !== CellClass.darkish && k !== CellClass.saturated && !dropped[c])) {
      verdict[c] = CellVerdict.film;
      found = true;
      continue;
    }
    if (k === CellClass.darkish) {
      if (verdict[c] === CellVerdict.undecided) undecidedCells++;
      else verdict[c] = CellVerdict.darkSurroundings;
    } else if (k === CellClass.saturated) verdict[c] = CellVerdict.glint;
    else if (k === CellClass.filmColour) verdict[c] = dropped[c] ? CellVerdict.notFilmColour : CellVerdict.isolated;
    else verdict[c] = CellVerdict.notFilmColour;
  }
  return { verdict, found, undecidedCells };
}

/** A neutral part whose outline lies near coloured film for less than this share is attached, not film. */
const ATTACHED_CONTACT_SHARE = 0.25;

/**
 * Tweezers, clamps and holders: neutral things that reach into the photo from outside and touch
 * the film only where they hold it. Their colour is explained by a neutral grey (steel, a shadow
 * on a grey bench) at least as well as by film, yet a first-order grey or a washed-out high order
 * may match it and its thickness may even continue the film's at the contact, so it joins the
 * film's seed. A part of the film whose cells a neutral grey explains within the noise (after an
 * opening that leaves out strips, e.g. a grey rim), that reaches the photo border (or the edge of
 * the region/mask), holds no anchor, and whose outline lies within a few cells of coloured film
 * (the rest of the film) for less than a quarter of its length is not film: a grey band of a real
 * film lies between its coloured bands, along them. The strips next to it that the opening left
 * out go with it (grown within the neutral cells by the opening radius plus one).
 */
function dropNeutralAttachments(film: Uint8Array, dropped: Uint8Array, input: FilmAreaInput): void {
  const { gridWidth: w, gridHeight: h, greyExplained, cellClass } = input;
  const cells = w * h;
  const r = Math.max(1, input.openingRadius);
  const grey = new Uint8Array(cells);
  const coloured = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) {
    grey[c] = film[c] && greyExplained[c] ? 1 : 0;
    coloured[c] = film[c] && !greyExplained[c] ? 1 : 0;
  }
  const opened = dilateSquare(erodeSquare(grey, w, h, r), w, h, r);
  for (let c = 0; c < cells; c++) opened[c] &= grey[c];
  const parts = labelComponents(opened, w, h, 8);
  if (parts.count === 0) return;
  const nearColoured = dilateSquare(coloured, w, h, r + 1);
  const outline = new Float64Array(parts.count + 1);
  const contact = new Float64Array(parts.count + 1);
  const reachesEdge = new Uint8Array(parts.count + 1);
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id === 0) continue;
    if (onBorder(c, w, h)) reachesEdge[id] = 1;
    const x = c % w;
    const y = (c - x) / w;
    let isOutline = false;
    for (let k = 0; k < 4; k++) {
      const nx = x + (k === 0 ? 1 : k === 1 ? -1 : 0);
      const ny = y + (k === 2 ? 1 : k === 3 ? -1 : 0);
      if (nx < 0 || ny < 0 || nx >= w || ny >= h) continue;
      const j = ny * w + nx;
      if (cellClass[j] === CellClass.excluded) reachesEdge[id] = 1;
      else if (parts.labels[j] !== id) isOutline = true;
    }
    if (!isOutline) continue;
    outline[id]++;
    if (nearColoured[c]) contact[id]++;
  }
  for (const c of input.anchorCells) reachesEdge[parts.labels[c]] = 0;
  const attached = new Uint8Array(cells);
  let any = false;
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id !== 0 && reachesEdge[id] && contact[id] < ATTACHED_CONTACT_SHARE * outline[id]) {
      attached[c] = 1;
      any = true;
    }
  }
  if (!any) return;
  growWithin(attached, grey, w, h, r + 1, () => true);
  for (let c = 0; c < cells; c++) {
    if (attached[c]) {
      film[c] = 0;
      dropped[c] = 1;
    }
  }
}

/** This many flat film components, each apart from the others, make a patchwork (a colour chart). */
const PATCHWORK_COUNT = 3;

/**
 * A colour chart or a row of labels: several flat patches, each apart from every other (no
 * kept film within two cells), whose colours happen to match some thickness. A film is one
 * continuous field, or patches that touch (a step wafer): PATCHWORK_COUNT or more flat,
 * separate patches are not film, unless the user asserted the thickness.
 */
function dropPatchwork(film: Uint8Array, dropped: Uint8Array, seeds: Components, input: FilmAreaInput): void {
  if (input.filmAsserted) return;
  const { gridWidth: w, gridHeight: h, cellBrightness } = input;
  const cells = w * h;
  const parts = labelComponents(film, w, h, 8);
  if (parts.count < PATCHWORK_COUNT) return;
  // Flatness is judged on each part's interior: its outer cells (the opening radius) mix the
  // patch with what surrounds it, and a blurred edge towards a dark surround reads as a
  // first-order film thinning to black. Parts too small to have an interior are judged whole.
  const interior = erodeSquare(film, w, h, Math.max(1, input.openingRadius));
  const inner = new Float64Array(parts.count + 1);
  for (let c = 0; c < cells; c++) if (interior[c]) inner[parts.labels[c]]++;
  const sum = new Float64Array(parts.count + 1);
  const squares = new Float64Array(parts.count + 1);
  const counted = new Float64Array(parts.count + 1);
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id === 0 || (inner[id] >= MIN_FILM_CELLS && !interior[c])) continue;
    sum[id] += cellBrightness[c];
    squares[id] += cellBrightness[c] ** 2;
    counted[id]++;
  }
  // Apart: no other part within two cells.
  const apart = new Uint8Array(parts.count + 1).fill(1);
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id === 0) continue;
    const x = c % w;
    const y = (c - x) / w;
    for (let dy = -2; dy <= 2; dy++) {
      const ny = y + dy;
      if (ny < 0 || ny >= h) continue;
      for (let dx = -2; dx <= 2; dx++) {
        const nx = x + dx;
        if (nx < 0 || nx >= w) continue;
        const other = parts.labels[ny * w + nx];
        if (other !== 0 && other !== id) apart[id] = 0;
      }
    }
  }
  const patch = new Uint8Array(parts.count + 1);
  let patches = 0;
  for (let id = 1; id <= parts.count; id++) {
    const n = counted[id];
    const mean = sum[id] / n;
    const flat = Math.sqrt(Math.max(0, squares[id] / n - mean * mean)) < FLAT_BRIGHTNESS;
    if (flat && apart[id]) {
      patch[id] = 1;
      patches++;
    }
  }
  if (patches < PATCHWORK_COUNT) return;
  for (let c = 0; c < cells; c++) {
    if (patch[parts.labels[c]]) {
      film[c] = 0;
      dropped[c] = 1;
    }
  }
  void seeds;
}

/** Mean chroma below this: a neutral surface (grey, white, silver), whose colour many thicknesses give. */
const NEUTRAL_CHROMA = 0.05;
/** Standard deviation of the cells' brightness below this (encoded units): a flat surface. */
const FLAT_BRIGHTNESS = 0.03;

/**
 * Which cells of the seed components are film: those of large enough components, less the
 * neutral surfaces around the film. Neutral colours (a grey bench, steel tweezers, a white card)
 * are given by first-order greys and washed-out high orders alike, so a neutral part belongs to
 * the film only where it continues the coloured film: a neutral part that reaches the photo
 * border, is a large flat surface (its brightness varies by less than 0.03 of full scale, where
 * a neutral band of film runs from grey to white), holds no anchor and continues the coloured
 * film along less than half of its outline is surroundings. When no large coloured film exists,
 * nothing says film (a grey card), unless the user asserted the thickness.
 */
function keepComponents(seeds: Components, input: FilmAreaInput, minSize: number): { film: Uint8Array; dropped: Uint8Array } {
  const { gridWidth: w, gridHeight: h, cellChroma, candidatePosition: p, perCell, maxJump } = input;
  const cells = w * h;
  const film = new Uint8Array(cells);
  const dropped = new Uint8Array(cells);
  const colouredCells = new Float64Array(seeds.count + 1);
  for (let c = 0; c < cells; c++) {
    const id = seeds.labels[c];
    if (id === 0 || seeds.sizes[id] < minSize) continue;
    film[c] = 1;
    if (cellChroma[c] >= NEUTRAL_CHROMA) colouredCells[id]++;
  }
  let coloured = false;
  for (let id = 1; id <= seeds.count; id++) if (colouredCells[id] >= minSize) coloured = true;
  const bestContinues = (a: number, b: number): boolean => Math.abs(p[a * perCell] - p[b * perCell]) <= maxJump;
  const neutral = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) neutral[c] = film[c] && cellChroma[c] < NEUTRAL_CHROMA ? 1 : 0;
  // Neutral parts of the kept components, joined where their brightness continues (not their
  // thickness: a grey surface's best thickness jumps between the many orders that give grey).
  const bright = input.cellBrightness;
  const parts = labelComponents(neutral, w, h, 8, (a, b) => Math.abs(bright[a] - bright[b]) <= FLAT_BRIGHTNESS / 2);
  // Each part's outline against coloured film: where the best thicknesses continue, or not.
  const continuing = new Float64Array(parts.count + 1);
  const breaking = new Float64Array(parts.count + 1);
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id === 0) continue;
    const x = c % w;
    const y = (c - x) / w;
    for (let k = 0; k < 4; k++) {
      const nx = x + (k === 0 ? 1 : k === 1 ? -1 : 0);
      const ny = y + (k === 2 ? 1 : k === 3 ? -1 : 0);
      if (nx < 0 || ny < 0 || nx >= w || ny >= h) continue;
      const j = ny * w + nx;
      if (!film[j] || neutral[j]) continue;
      if (bestContinues(c, j)) continuing[id]++;
      else breaking[id]++;
    }
  }
  // Spread of each part's best thickness and the photo edges it reaches: a surface around the
  // film is flat in "thickness" and reaches the photo border; a grey band of film has a gradient.
  const sum = new Float64Array(parts.count + 1);
  const squares = new Float64Array(parts.count + 1);
  const edges = new Uint8Array(parts.count + 1);
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id === 0) continue;
    const v = input.cellBrightness[c];
    sum[id] += v;
    squares[id] += v * v;
    if (onBorder(c, w, h)) edges[id] = 1;
  }
  const anchored = new Uint8Array(parts.count + 1);
  for (const c of input.anchorCells) anchored[parts.labels[c]] = 1;
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id === 0) continue;
    const outline = continuing[id] + breaking[id];
    const mean = sum[id] / parts.sizes[id];
    const flat = Math.sqrt(Math.max(0, squares[id] / parts.sizes[id] - mean * mean)) < FLAT_BRIGHTNESS;
    const apart = continuing[id] < 0.5 * outline || outline === 0;
    const surface = flat && parts.sizes[id] >= minSize;
    const surroundings = anchored[id] ? false : coloured ? apart && edges[id] === 1 && surface : !input.filmAsserted;
    if (surroundings) {
      film[c] = 0;
      dropped[c] = 1;
    }
  }
  return { film, dropped };
}

/**
 * Whether the best candidate of cell a continues a candidate of cell b and the best of b one of a.
 * (Any pair would join everything to a neutral surface, whose colour many orders give.)
 */
function candidatesContinue(input: FilmAreaInput, a: number, b: number): boolean {
  return continuesBest(input, a, b) && continuesBest(input, b, a);
}

function continuesBest(input: FilmAreaInput, a: number, b: number): boolean {
  const { candidatePosition: p, candidateCount: n, perCell, maxJump } = input;
  if (n[a] === 0) return false;
  const best = p[a * perCell];
  for (let j = 0; j < n[b]; j++) if (Math.abs(best - p[b * perCell + j]) <= maxJump) return true;
  return false;
}

/** Grows `set` into `allowed` cells (8-neighbours) for `steps` steps where `joins` holds. */
function growWithin(
  set: Uint8Array,
  allowed: Uint8Array,
  w: number,
  h: number,
  steps: number,
  joins: (a: number, b: number) => boolean,
): void {
  let frontier: number[] = [];
  for (let c = 0; c < set.length; c++) if (set[c]) frontier.push(c);
  for (let s = 0; s < steps && frontier.length > 0; s++) {
    const next: number[] = [];
    for (const c of frontier) {
      const x = c % w;
      const y = (c - x) / w;
      for (let dy = -1; dy <= 1; dy++) {
        const ny = y + dy;
        if (ny < 0 || ny >= h) continue;
        for (let dx = -1; dx <= 1; dx++) {
          const nx = x + dx;
          if (nx < 0 || nx >= w || (dx === 0 && dy === 0)) continue;
          const j = ny * w + nx;
          if (set[j] || !allowed[j] || !joins(c, j)) continue;
          set[j] = 1;
          next.push(j);
        }
      }
    }
    frontier = next;
  }
}

/** Verdict per dark component id by what its outline borders. */
function classifyDark(dark: Components, input: FilmAreaInput, film: Uint8Array): Uint8Array {
  const { gridWidth: w, gridHeight: h, cellClass, candidatePosition, candidateCount, perCell, thinPosition } = input;
  const thin = new Float64Array(dark.count + 1);
  const other = new Float64Array(dark.count + 1);
  const border = new Uint8Array(dark.count + 1);
  const band = new Float64Array(dark.count + 1);
  // Does the film itself run off the photo (or the region)? Only then can black at the border be
  // film; and when film holds most of the photo's border besides this dark region, the photo is a
  // close-up of the film and black at the border beside thin film is black film.
  const { borderCells, filmBorderCells } = filmOnBorder(film, cellClass, w, h);
  const filmAtBorder = filmBorderCells > 0;
  const foreign = new Float64Array(dark.count + 1);
  for (let c = 0; c < w * h; c++) {
    const id = dark.labels[c];
    if (id === 0) continue;
    const x = c % w;
    const y = (c - x) / w;
    if (x === 0 || y === 0 || x === w - 1 || y === h - 1) border[id] = 1;
    for (let k = 0; k < 4; k++) {
      const dx = k === 0 ? 1 : k === 1 ? -1 : 0;
      const dy = k === 2 ? 1 : k === 3 ? -1 : 0;
      let nx = x + dx;
      let ny = y + dy;
      if (nx < 0 || ny < 0 || nx >= w || ny >= h) continue;
      let j = ny * w + nx;
      if (dark.labels[j] === id) continue;
      if (cellClass[j] === CellClass.excluded) {
        border[id] = 1;
        continue;
      }
      if (cellClass[j] === CellClass.darkish) continue;
      // Look through a few cells of colour mixtures (a sharp black front blurred by the lens and
      // JPEG) to what lies behind them.
      for (let step = 0; step < MIXTURE_LOOK_THROUGH && cellClass[j] === CellClass.unexplained; step++) {
        const fx = nx + dx;
        const fy = ny + dy;
        if (fx < 0 || fy < 0 || fx >= w || fy >= h) break;
        nx = fx;
        ny = fy;
        j = ny * w + nx;
      }
      if (cellClass[j] === CellClass.unexplained || cellClass[j] === CellClass.darkish || cellClass[j] === CellClass.excluded) {
        foreign[id]++;
        continue;
      }
      // First order by any of its candidates: a first-order white is also matched by washed-out
      // high orders, and may be ranked below them.
      let thinPositioned = false;
      for (let q = 0; q < candidateCount[j]; q++) if (candidatePosition[j * perCell + q] < thinPosition) thinPositioned = true;
      if (film[j] === 1 && thinPositioned) thin[id]++;
      else {
        other[id]++;
        // A first-order band the strips test removed (black | white | colours) looks like a
        // grey wire: it counts only towards "undecided".
        if (cellClass[j] === CellClass.filmColour && thinPositioned) band[id]++;
        else foreign[id]++;
      }
    }
  }
  const out = new Uint8Array(dark.count + 1);
  for (let id = 1; id <= dark.count; id++) {
    const total = thin[id] + other[id];
    const share = total > 0 ? thin[id] / total : 0;
    if (!border[id]) out[id] = share >= BLACK_FILM_INSIDE ? CellVerdict.film : CellVerdict.darkSurroundings;
    else if (share >= BLACK_FILM_AT_BORDER) out[id] = CellVerdict.film;
    else if (filmAtBorder && (thin[id] + band[id]) >= UNDECIDED_FROM * (thin[id] + band[id] + foreign[id] + other[id] - band[id])) {
      out[id] = closeUp(borderCells, filmBorderCells) ? CellVerdict.film : CellVerdict.undecided;
    }
    else out[id] = CellVerdict.darkSurroundings;
  }
  return out;
}

/** A dark region is black film when at least this share of it lay in the previous frame's film. */
const PRIOR_INSIDE_SHARE = 0.9;

/**
 * A series: black film that stays inside the previous frame's film stays film. A dark region
 * whose cells lay (at least 90 %) in the previous frame's film area, widened by the opening radius
 * plus one cell (a film slides a little between frames), and that meets this frame's film (within
 * the few cells of colour mixtures a sharp black front leaves) is black film, whatever share of
 * its outline is thin film: a black film that grew over most of the frame meets its first-order
 * band along a short front only, and one cut by the photo border is no longer undecided. A
 * background newly uncovered by a shrinking or sliding film reaches beyond the previous film (it
 * joins the surroundings), and a frame whose film burst has no film to meet: neither is followed.
 */
function followPriorFilm(dark: Components, darkVerdict: Uint8Array, input: FilmAreaInput, film: Uint8Array): void {
  const { gridWidth: w, gridHeight: h, priorFilm } = input;
  if (!priorFilm) return;
  const cells = w * h;
  const prior = dilateSquare(priorFilm, w, h, input.openingRadius + 1);
  const nearFilm = dilateSquare(film, w, h, MIXTURE_LOOK_THROUGH + 1);
  const inside = new Float64Array(dark.count + 1);
  const meets = new Uint8Array(dark.count + 1);
  for (let c = 0; c < cells; c++) {
    const id = dark.labels[c];
    if (id === 0) continue;
    if (prior[c]) inside[id]++;
    if (nearFilm[c]) meets[id] = 1;
  }
  for (let id = 1; id <= dark.count; id++) {
    if (darkVerdict[id] !== CellVerdict.film && meets[id] && inside[id] >= PRIOR_INSIDE_SHARE * dark.sizes[id]) darkVerdict[id] = CellVerdict.film;
  }
}

/** Dark cells removed by the opening: film where they touch film and no surroundings. */
function settleThinDark(darkMask: Uint8Array, darkOpened: Uint8Array, verdict: Uint8Array, film: Uint8Array, w: number, h: number): void {
  for (let pass = 0; pass < 4; pass++) {
    let changed = 0;
    for (let c = 0; c < w * h; c++) {
      if (!darkMask[c] || darkOpened[c] || verdict[c] !== 0) continue;
      const x = c % w;
      const y = (c - x) / w;
      let touchesFilm = false;
      let touchesOther = false;
      for (let dy = -1; dy <= 1; dy++) {
        const ny = y + dy;
        if (ny < 0 || ny >= h) continue;
        for (let dx = -1; dx <= 1; dx++) {
          const nx = x + dx;
          if (nx < 0 || nx >= w) continue;
          const j = ny * w + nx;
          if (film[j]) touchesFilm = true;
          else if (verdict[j] === CellVerdict.darkSurroundings || verdict[j] === CellVerdict.undecided) touchesOther = true;
        }
      }
      if (touchesOther) {
        verdict[c] = CellVerdict.darkSurroundings;
        changed++;
      } else if (touchesFilm) {
        verdict[c] = CellVerdict.film;
        film[c] = 1;
        changed++;
      }
    }
    if (changed === 0) break;
  }
}

/**
 * Cells the film holds: components (4-connected) of non-film cells inside the search area that
 * touch no surroundings (large dark surroundings, dropped neutral surfaces), and at the photo
 * border are small or hold film colours among their mixtures.
 */
/** Border cells of the grid inside the search area, and how many of them are film. */
function filmOnBorder(film: Uint8Array, cellClass: Uint8Array, w: number, h: number): { borderCells: number; filmBorderCells: number } {
  let borderCells = 0;
  let filmBorderCells = 0;
  for (let c = 0; c < w * h; c++) {
    if (!onBorder(c, w, h) || cellClass[c] === CellClass.excluded) continue;
    borderCells++;
    if (film[c]) filmBorderCells++;
  }
  return { borderCells, filmBorderCells };
}

/** Whether film holds at least half of the photo border (of the search area's border cells). */
function isCloseUp(film: Uint8Array, cellClass: Uint8Array, w: number, h: number): boolean {
  const { borderCells, filmBorderCells } = filmOnBorder(film, cellClass, w, h);
  return closeUp(borderCells, filmBorderCells);
}

function closeUp(borderCells: number, filmBorderCells: number): boolean {
  return borderCells > 0 && filmBorderCells >= CLOSE_UP_BORDER_SHARE * borderCells;
}

/** Whether cell c lies on the grid's outer edge. */
function onBorder(c: number, w: number, h: number): boolean {
  const x = c % w;
  const y = (c - x) / w;
  return x === 0 || y === 0 || x === w - 1 || y === h - 1;
}

function enclosedByFilm(
  film: Uint8Array,
  cellClass: Uint8Array,
  verdict: Uint8Array,
  dropped: Uint8Array,
  /** 1: large dark surroundings; 2: large undecided dark (both count as surroundings here). */
  significantDark: Uint8Array,
  w: number,
  h: number,
  searchArea: number,
): Uint8Array {
  const cells = w * h;
  const rest = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) rest[c] = film[c] || cellClass[c] === CellClass.excluded ? 0 : 1;
  const parts = labelComponents(rest, w, h, 4);
  const open = new Uint8Array(parts.count + 1);
  const border = new Uint8Array(parts.count + 1);
  const unexplained = new Float64Array(parts.count + 1);
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id === 0) continue;
    if (onBorder(c, w, h)) border[id] = 1;
    if (cellClass[c] === CellClass.unexplained) unexplained[id]++;
    if (dropped[c] || (verdict[c] === CellVerdict.darkSurroundings && significantDark[c]) || significantDark[c] === 2) open[id] = 1;
  }
  // What reaches the photo border without touching surroundings is film's when it is small, or
  // holds film colours among its mixtures (dense fringes cut by the border); a large area almost
  // wholly of colours no film gives there (a coloured mat, a label) is not.
  for (let id = 1; id <= parts.count; id++) {
    if (border[id] && parts.sizes[id] > BORDER_POCKET_SHARE * searchArea && unexplained[id] > BORDER_UNEXPLAINED_SHARE * parts.sizes[id]) open[id] = 1;
  }
  const out = new Uint8Array(cells);
  for (let c = 0; c < cells; c++) {
    const id = parts.labels[c];
    if (id !== 0 && !open[id]) out[c] = 1;
  }
  return out;
}

/** Pixel counts by reason, from the pixel statuses' cell verdicts (see mapPixels). */
export function emptyExclusions(): { -readonly [K in keyof FilmAreaExclusions]: number } {
  return { outside_region: 0, dark_surroundings: 0, not_film_colour: 0, glint: 0, isolated: 0, undecided: 0 };
}
