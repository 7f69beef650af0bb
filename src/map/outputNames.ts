/** The files a map writes per photo `<stem>`, by the names `--outputs` and `mapPhotos` take. */
export const MAP_OUTPUT_FILES = {
  npy: '.thickness.npy',
  tif: '.thickness.tif',
  confidence: '.confidence.npy',
  status: '.status.npy',
  map: '.map.png',
  flags: '.flags.png',
  json: '.json',
  report: '.report.html',
} as const;
export type MapOutputName = keyof typeof MAP_OUTPUT_FILES;
export const MAP_OUTPUT_NAMES = Object.keys(MAP_OUTPUT_FILES) as MapOutputName[];
