/**
 * The film area's rules on small grids of our own (src/map/filmArea.ts): a series' prior (the
 * previous frame's film area decides dark regions inside it) and neutral attachments (a grey part
 * reaching the border that touches the coloured film along a short contact). The grids are
 * INVENTED layouts (a frame of 30 × 20 cells), built to state each rule's intent; the field scenes
 * (tests/map-film-area.test.ts, tests/series-film-prior.test.ts) check them on photos.
 */
import { describe, expect, it } from 'vitest';
import { CellClass, CellVerdict, type FilmAreaInput, findFilmArea } from '../src/map/filmArea.js';

const W = 30;
const H = 20;

/** Our frame: cloth (dark) around a wire (unexplained) holding black film (rows 2–11) over coloured film (rows 12–18). */
function frameGrid(options: { withFilm: boolean; priorRows?: [number, number] | null }): FilmAreaInput {
  const n = W * H;
  const cellClass = new Uint8Array(n).fill(CellClass.darkish);
  const position = new Float32Array(n);
  const count = new Uint8Array(n);
  const chroma = new Float32Array(n);
  const brightness = new Float32Array(n);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const c = y * W + x;
      const wire = (y === 1 || y === 19) && x >= 4 && x <= 25 ? true : (x === 4 || x === 25) && y >= 1 && y <= 19;
      if (wire) cellClass[c] = CellClass.unexplained;
      else if (options.withFilm && x > 4 && x < 25 && y >= 12 && y < 19) {
        // Coloured film of the second order and up (above the thin position 100), rising 2 per row.
        cellClass[c] = CellClass.filmColour;
        position[c] = 200 + 2 * (y - 12) + 0.1 * x;
        count[c] = 1;
        chroma[c] = 0.2;
        brightness[c] = 0.4 + 0.02 * (y - 12);
      }
    }
  }
  const prior = options.priorRows ? new Uint8Array(n) : null;
  if (prior && options.priorRows) {
    const [from, to] = options.priorRows;
    for (let y = from; y <= to; y++) for (let x = 5; x < 25; x++) prior[y * W + x] = 1;
  }
  return {
    gridWidth: W, gridHeight: H, cellClass, candidatePosition: position, candidateCount: count, perCell: 1, maxJump: 5,
    thinPosition: 100, openingRadius: 1, cellChroma: chroma, filmAsserted: false, cellBrightness: brightness, anchorCells: [],
    greyExplained: new Uint8Array(n), priorFilm: prior,
  };
}

const at = (x: number, y: number) => y * W + x;

describe('film area prior (a series follows the previous frame)', () => {
  it('without a prior, black film that meets the film only along a front of coloured (not thin) film is taken for surroundings', () => {
    const area = findFilmArea(frameGrid({ withFilm: true }));
    expect(area.found).toBe(true);
    expect(area.verdict[at(15, 15)]).toBe(CellVerdict.film);
    expect(area.verdict[at(15, 5)]).toBe(CellVerdict.darkSurroundings);
  });

  it('with the previous frame\'s film over the same rows, the black film inside it is film and the cloth outside is not', () => {
    const area = findFilmArea(frameGrid({ withFilm: true, priorRows: [2, 18] }));
    expect(area.verdict[at(15, 5)]).toBe(CellVerdict.film);
    expect(area.verdict[at(15, 2)]).toBe(CellVerdict.film);
    expect(area.verdict[at(1, 10)]).toBe(CellVerdict.darkSurroundings);
  });

  it('a dark region only partly inside the previous film (less than 90 %) is not decided by it', () => {
    const area = findFilmArea(frameGrid({ withFilm: true, priorRows: [8, 18] }));
    expect(area.verdict[at(15, 5)]).toBe(CellVerdict.darkSurroundings);
  });

  it('a burst frame (no film colour left) finds no film, whatever the previous frame held', () => {
    const area = findFilmArea(frameGrid({ withFilm: false, priorRows: [2, 18] }));
    expect(area.found).toBe(false);
  });
});

describe('neutral attachments (tweezers)', () => {
  /** Coloured film (x 2–11) with a grey bar (rows 8 on) from the right border touching it at x = 12. */
  function tweezersGrid(contactRows: number): FilmAreaInput {
    const n = W * H;
    const input = frameGrid({ withFilm: false });
    const cellClass = input.cellClass as Uint8Array;
    const position = input.candidatePosition as Float32Array;
    const count = input.candidateCount as Uint8Array;
    const chroma = input.cellChroma as Float32Array;
    const brightness = input.cellBrightness as Float32Array;
    const grey = new Uint8Array(n);
    cellClass.fill(CellClass.unexplained);
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const c = y * W + x;
        const film = x >= 2 && x < 12 && y >= 2 && y < 18;
        const bar = x >= 12 && y >= 8 && y < 8 + contactRows;
        if (!film && !bar) continue;
        cellClass[c] = CellClass.filmColour;
        count[c] = 1;
        // The bar's grey matches a thickness that continues the film's at the contact.
        position[c] = 300 + 0.5 * x;
        chroma[c] = bar ? 0.04 : 0.2;
        brightness[c] = bar ? 0.55 + 0.05 * ((x + y) % 2) : 0.4 + 0.01 * y;
        if (bar) grey[c] = 1;
      }
    }
    return { ...input, greyExplained: grey, priorFilm: null };
  }

  it('a grey bar from the border touching the film along a short contact is not film; the film is', () => {
    const area = findFilmArea(tweezersGrid(4));
    expect(area.found).toBe(true);
    expect(area.verdict[at(6, 10)]).toBe(CellVerdict.film);
    expect(area.verdict[at(26, 9)]).not.toBe(CellVerdict.film);
  });

  it('the same grey part lying along the film (a grey band between coloured ones) stays film', () => {
    // Grey band of rows 8–11 across the whole film, reaching the right border: its outline runs
    // along coloured film above and below.
    const input = tweezersGrid(4);
    const grey = input.greyExplained as Uint8Array;
    const cellClass = input.cellClass as Uint8Array;
    for (let y = 2; y < 18; y++) {
      for (let x = 2; x < W; x++) {
        const c = y * W + x;
        if (x >= 12 && (y < 8 || y >= 12)) {
          cellClass[c] = CellClass.filmColour;
          (input.candidateCount as Uint8Array)[c] = 1;
          (input.candidatePosition as Float32Array)[c] = 300 + 0.5 * x;
          (input.cellChroma as Float32Array)[c] = 0.2;
          (input.cellBrightness as Float32Array)[c] = 0.4 + 0.01 * y;
        }
        if (y >= 8 && y < 12) grey[c] = 1;
      }
    }
    const area = findFilmArea(input);
    expect(area.verdict[at(26, 9)]).toBe(CellVerdict.film);
  });
});
