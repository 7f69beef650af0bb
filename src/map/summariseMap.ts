/**
 * The summaries every map carries, whatever mode made it (colour or single line): thin regions
 * (with per-pixel labels for the flags image), statistics and the histogram.
 */
import { computeMapStatistics, thicknessHistogram } from './statistics.js';
import { findThinRegions } from './thinRegions.js';
import type { MapResult } from './types.js';

export interface MapSummary {
  readonly thinRegions: MapResult['thinRegions'];
  readonly thinLabels: Int32Array;
  readonly stats: MapResult['stats'];
  readonly histogram: MapResult['histogram'];
}

export function summariseMap(
  thicknessNm: Float32Array,
  status: Uint8Array,
  width: number,
  height: number,
  thinBelowNm: number | null,
  pixelSizeUm: number | null,
): MapSummary {
  const regions = findThinRegions(thicknessNm, status, width, height, thinBelowNm, pixelSizeUm);
  const stats = computeMapStatistics(thicknessNm, status, thinBelowNm, regions.regions.length);
  return {
    thinRegions: regions.regions,
    thinLabels: regions.labels,
    stats,
    histogram: thicknessHistogram(thicknessNm, status, stats.min_nm, stats.max_nm),
  };
}
