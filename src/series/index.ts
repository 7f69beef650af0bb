/** Photo series: ordering, timing, resumable and shardable mapping, aggregation, drainage fits. */
export { runSeries, DEFAULT_CHUNK_FRAMES, type SeriesOptions, type SeriesResult } from './runSeries.js';
export { expandInputs, type ExpandedInputs } from './expandInputs.js';
export { compareNatural } from './naturalOrder.js';
export { assignFrameTimes, type FrameTiming, type FrameTimingInput } from './frameTimes.js';
export { parseShard, type Shard } from './parseShard.js';
export { chunkFrames, shardChunks } from './chunkFrames.js';
export { settingsHash, canonicalJson } from './settingsHash.js';
export { collectSeriesRows, type SeriesRow, type CollectedRows } from './seriesRows.js';
export { formatSeriesCsv, SERIES_CSV_COLUMNS } from './seriesCsv.js';
export { seriesSummary, seriesSummaryJson, SERIES_SCHEMA_VERSION, SERIES_CAUTION, type SeriesSummary } from './seriesSummary.js';
export { formatProgressBar, formatProgressLine, formatDuration } from './progressText.js';
export { MAP_FRAME_PROCESSOR_URL, type MapFrameConfig } from './mapFrameConfig.js';
export { DRAINAGE_MODELS, exponentialModel, powerLawModel, reynoldsModel, type DrainageModel } from './fits/drainageModels.js';
export { fitDrainage, type DrainageFit, type CrossingPrediction, type FitDrainageOptions } from './fits/fitDrainage.js';
export { fitSeriesDrainage, type SeriesDrainage } from './fits/fitSeriesDrainage.js';
export type { FrameJob, FrameProcessor, ProcessorSource, FrameEvent, FrameOutcome, SeriesProgress, FrameRecord } from './types.js';
export { findRupture, describeRupture, RUPTURE_RULE, type RuptureRecord, type RuptureFinding } from './rupture.js';
