/**
 * Builds the grid a report embeds from a full-resolution map: unchanged when it has at most
 * `maxCells` pixels, otherwise downsampled by the smallest integer step that fits, each cell
 * taking the value of its block's top-left pixel (x = cx·step, y = cy·step), so every value
 * shown in the page is a value of the map files at a known pixel. Copies the arrays.
 */
import type { ReportGrid } from './types.js';

export const defaultMaxReportCells = 250_000;

export interface FullResolutionMap {
  width: number;
  height: number;
  thicknessNm: Float32Array;
  confidence: Float32Array;
  status?: Uint8Array;
}

export function makeReportGrid(map: FullResolutionMap, maxCells = defaultMaxReportCells): ReportGrid {
  const { width, height } = map;
  if (!Number.isInteger(width) || width < 1 || !Number.isInteger(height) || height < 1) {
    throw new RangeError(`makeReportGrid: width and height must be integers >= 1, received ${width} and ${height}`);
  }
  if (!Number.isInteger(maxCells) || maxCells < 1) throw new RangeError(`makeReportGrid: maxCells must be an integer >= 1, received ${maxCells}`);
  if (map.status !== undefined && (!(map.status instanceof Uint8Array) || map.status.length !== width * height)) {
    throw new RangeError(`makeReportGrid: status must be a Uint8Array of width × height = ${width * height} values, received ${map.status?.length}`);
  }
  for (const key of ['thicknessNm', 'confidence'] as const) {
    if (!(map[key] instanceof Float32Array) || map[key].length !== width * height) {
      throw new RangeError(`makeReportGrid: ${key} must be a Float32Array of width × height = ${width * height} values, received ${map[key]?.length}`);
    }
  }
  let step = Math.max(1, Math.ceil(Math.sqrt((width * height) / maxCells)));
  while (Math.ceil(width / step) * Math.ceil(height / step) > maxCells) step++;
  const gw = Math.ceil(width / step);
  const gh = Math.ceil(height / step);
  const thicknessNm = new Float32Array(gw * gh);
  const confidence = new Float32Array(gw * gh);
  const status = map.status ? new Uint8Array(gw * gh) : undefined;
  for (let cy = 0; cy < gh; cy++) {
    const row = cy * step * width;
    for (let cx = 0; cx < gw; cx++) {
      thicknessNm[cy * gw + cx] = map.thicknessNm[row + cx * step];
      confidence[cy * gw + cx] = map.confidence[row + cx * step];
      if (status) status[cy * gw + cx] = map.status![row + cx * step];
    }
  }
  return { width: gw, height: gh, step, originalWidth: width, originalHeight: height, thicknessNm, confidence, ...(status ? { status } : {}) };
}
