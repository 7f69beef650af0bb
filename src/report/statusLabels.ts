/**
 * Words for the map's pixel status codes (`PixelStatus` in `src/map/types.ts`), shown in the
 * pointer readout so a reader sees why a pixel has no thickness.
 */
import { PixelStatus } from '../map/types.js';

export const statusLabels: Record<number, string> = {
  [PixelStatus.ok]: '',
  [PixelStatus.dark]: 'too dark: thinner than the first-order limit, or no film',
  [PixelStatus.tooThick]: 'colours washed out: thicker than white light can resolve',
  [PixelStatus.ambiguous]: 'colour or interference order ambiguous',
  [PixelStatus.excluded]: 'outside the region or mask',
  [PixelStatus.saturated]: 'clipped or saturated in the photo',
  [PixelStatus.notFilm]: 'not film (background, frame, holder or glint)',
  [PixelStatus.undecided]: 'dark: black film or background, cannot tell (give --region or --mask)',
};
