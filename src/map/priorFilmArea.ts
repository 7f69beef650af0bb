/**
 * The previous frame's film area on the mapper's cell grid, for a series (`--film-area auto`):
 * a film shrinks, slides, thins and bursts between frames, but does not jump. The previous frame's
 * pixel statuses (PixelStatus, src/map/types.ts) say where its film was: every pixel that is not
 * outside the region/mask, not "not film" and not "undecided" (black film too dark to measure is
 * status `dark` and belongs to the film). A cell is prior film when at least half of its pixels are.
 */
import { PixelStatus } from './types.js';

export function priorFilmCells(priorStatus: Uint8Array, width: number, height: number, block: number, gridWidth: number, gridHeight: number): Uint8Array {
  const film = new Uint32Array(gridWidth * gridHeight);
  const total = new Uint32Array(gridWidth * gridHeight);
  for (let y = 0; y < height; y++) {
    const row = Math.floor(y / block) * gridWidth;
    for (let x = 0; x < width; x++) {
      const s = priorStatus[y * width + x];
      const c = row + Math.floor(x / block);
      total[c]++;
      if (s !== PixelStatus.excluded && s !== PixelStatus.notFilm && s !== PixelStatus.undecided) film[c]++;
    }
  }
  const out = new Uint8Array(gridWidth * gridHeight);
  for (let c = 0; c < out.length; c++) out[c] = total[c] > 0 && 2 * film[c] >= total[c] ? 1 : 0;
  return out;
}
