/**
 * Warnings for anchors (`--anchor X,Y=NM`) that lie outside the film area of a map: such an
 * anchor cannot bind the map where it is (issue 13, "Bad input"). Pure; the caller adds the
 * lines to the map's warnings. An anchor the mapper already warned about (a warning naming
 * `--anchor X,Y`) is not repeated.
 */
import { type Anchor, PixelStatus } from './types.js';

const WHY: Record<number, string> = {
  [PixelStatus.excluded]: 'outside --region/--mask',
  [PixelStatus.notFilm]: 'a pixel found not to be film',
  [PixelStatus.undecided]: 'a dark pixel that may be background',
};

export function anchorWarnings(
  anchors: readonly Anchor[],
  status: Uint8Array,
  width: number,
  height: number,
  existing: readonly string[] = [],
): string[] {
  const out: string[] = [];
  for (const a of anchors) {
    if (!(Number.isInteger(a.x) && Number.isInteger(a.y) && a.x >= 0 && a.y >= 0 && a.x < width && a.y < height)) continue;
    const why = WHY[status[a.y * width + a.x]];
    if (why === undefined) continue;
    const name = `--anchor ${a.x},${a.y}`;
    if (existing.some((w) => w.includes(`${name}=`) || w.includes(`${name} `))) continue;
    out.push(
      `${name}=${a.thicknessNm} lies outside the film area (${why}): it cannot fix the thickness there; ` +
        'put it on the film, or give --region/--mask or --film-area whole',
    );
  }
  return out;
}
