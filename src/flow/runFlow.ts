/**
 * The flow of a finished series: for each pair of consecutive mapped frames, the dense flow of
 * the thickness maps (./denseFlow.ts), written as `<stem>.flow.npy` (float32 H × W × 2: vx, vy per
 * second, px/s or µm/s; NaN where unknown or less confident than `minConfidence`),
 * `<stem>.flow-confidence.npy` (float32 0…1), `<stem>.flow.png` (arrows over the thickness) and
 * `<stem>.flow.json` (the pair's record and summary, written last: a pair with a current record
 * is done and skipped on a rerun). Then, from all records present, the aggregates `flow.csv`,
 * `patches.csv` and `flow.json`, replaced together (../io/writeOutputSet.ts).
 * Pairs can be split over shards (K/N: the K-th of N contiguous parts); aggregation then reads what
 * the folder holds, so N shards and one aggregation give what one run gives.
 */
import { createHash } from 'node:crypto';
import { readFile, rm } from 'node:fs/promises';
import { join, resolve } from 'node:path';
import { InputError } from '../errors.js';
import { atomicWriteFile } from '../io/atomicWriteFile.js';
import { decodeNpy } from '../io/decodeNpy.js';
import { encodeNpy } from '../io/encodeNpy.js';
import { ensureOutputDir } from '../io/ensureOutputDir.js';
import { readThicknessGrid } from '../io/readThicknessGrid.js';
import { recoverStagedSets, writeOutputSet } from '../io/writeOutputSet.js';
import { csvText } from '../io/csvCell.js';
import { findThinRegions } from '../map/thinRegions.js';
import { PixelStatus } from '../map/types.js';
import { LAMELLA_VERSION } from '../version.js';
import { denseFlow } from './denseFlow.js';
import { flowOverlayPng } from './flowOverlay.js';
import { summariseFlow, type FlowSummary } from './flowSummary.js';
import { meanFlowIn, trackPatches, type PatchFrame, type PatchRow } from './patches.js';
import { readSeriesForFlow, type SeriesForFlow, type SeriesFrameForFlow } from './seriesInput.js';

export const FLOW_SCHEMA_VERSION = 1;
/** Bumped when the method changes what it computes: older pair records are then recomputed. */
const METHOD_VERSION = 'lk-pyramid-thinning-fb-2';

export interface FlowOptions {
  /** Output folder (created if missing; a rerun into it resumes). */
  readonly outDir: string;
  /** Pixel size, µm: velocities in µm/s; default the series' own (`pixel_size_um`), else px/s. */
  readonly pixelSizeUm?: number | null;
  /** Thin-patch threshold, nm; default the series' own (`thin_below_nm`); null: no patches. */
  readonly thinBelowNm?: number | null;
  /** Vectors less confident than this are NaN in `.flow.npy` and left out of the summaries (0…1); default 0.5. */
  readonly minConfidence?: number;
  /** σ of the flow's Gaussian window, px; default 4. */
  readonly windowSigmaPx?: number;
  /** Most pyramid levels; default 6. */
  readonly maxLevels?: number;
  /** Smallest thin patch tracked, px; default 20. */
  readonly minPatchAreaPx?: number;
  /** Write the `<stem>.flow.png` overlays; default true. */
  readonly overlays?: boolean;
  /** Compute only the K-th of N contiguous parts of the pairs, then aggregate what the folder holds. */
  readonly shard?: { readonly index: number; readonly count: number } | null;
  /** Compute nothing; aggregate the pair records already in the folder. */
  readonly aggregateOnly?: boolean;
}

export interface FlowProgress {
  readonly done: number;
  readonly total: number;
  readonly pair: string;
  readonly outcome: 'computed' | 'skipped';
}

export interface FlowCallbacks {
  readonly onProgress?: (p: FlowProgress) => void;
  readonly signal?: AbortSignal;
}

export interface FlowPairRecord {
  readonly frame: string;
  readonly nextFrame: string;
  readonly stem: string;
  readonly timeS: number;
  readonly dtS: number;
  readonly settingsHash: string;
  readonly summary: FlowSummary;
}

export interface FlowResult {
  readonly outDir: string;
  readonly unit: 'px/s' | 'µm/s';
  readonly pairs: readonly FlowPairRecord[];
  /** Pairs with no current record (not computed by this run or any before). */
  readonly missingPairs: readonly string[];
  readonly computed: number;
  readonly skipped: number;
  readonly patches: readonly PatchRow[];
  readonly outputs: readonly string[];
  readonly warnings: readonly string[];
  readonly interrupted: boolean;
}

export function pairPaths(outDir: string, stem: string): { npy: string; confidence: string; png: string; json: string } {
  return {
    npy: join(outDir, `${stem}.flow.npy`),
    confidence: join(outDir, `${stem}.flow-confidence.npy`),
    png: join(outDir, `${stem}.flow.png`),
    json: join(outDir, `${stem}.flow.json`),
  };
}

export const FLOW_AGGREGATES = ['flow.csv', 'patches.csv', 'flow.json'] as const;

interface Resolved {
  readonly pixelSizeUm: number | null;
  readonly thinBelowNm: number | null;
  readonly minConfidence: number;
  readonly windowSigmaPx: number;
  readonly maxLevels: number;
  readonly minPatchAreaPx: number;
  readonly overlays: boolean;
}

function resolveOptions(options: FlowOptions, series: SeriesForFlow): Resolved {
  const pixelSizeUm = options.pixelSizeUm === undefined ? series.pixelSizeUm : options.pixelSizeUm;
  if (pixelSizeUm !== null && !(Number.isFinite(pixelSizeUm) && pixelSizeUm > 0)) throw new RangeError(`pixelSizeUm must be a number > 0, received ${pixelSizeUm}`);
  const thinBelowNm = options.thinBelowNm === undefined ? series.thinBelowNm : options.thinBelowNm;
  if (thinBelowNm !== null && !(Number.isFinite(thinBelowNm) && thinBelowNm > 0)) throw new RangeError(`thinBelowNm must be a number > 0, received ${thinBelowNm}`);
  const minConfidence = options.minConfidence ?? 0.5;
  if (!(minConfidence >= 0 && minConfidence < 1)) throw new RangeError(`minConfidence must be from 0 to below 1, received ${minConfidence}`);
  const windowSigmaPx = options.windowSigmaPx ?? 4;
  if (!(windowSigmaPx >= 1 && windowSigmaPx <= 32)) throw new RangeError(`windowSigmaPx must be from 1 to 32, received ${windowSigmaPx}`);
  const maxLevels = options.maxLevels ?? 6;
  if (!Number.isInteger(maxLevels) || maxLevels < 1 || maxLevels > 12) throw new RangeError(`maxLevels must be a whole number from 1 to 12, received ${maxLevels}`);
  const minPatchAreaPx = options.minPatchAreaPx ?? 20;
  if (!Number.isInteger(minPatchAreaPx) || minPatchAreaPx < 1) throw new RangeError(`minPatchAreaPx must be a whole number >= 1, received ${minPatchAreaPx}`);
  return { pixelSizeUm, thinBelowNm, minConfidence, windowSigmaPx, maxLevels, minPatchAreaPx, overlays: options.overlays ?? true };
}

function pairHash(a: SeriesFrameForFlow, b: SeriesFrameForFlow, r: Resolved): string {
  const key = JSON.stringify([METHOD_VERSION, a.name, a.settingsHash, a.timeS, b.name, b.settingsHash, b.timeS, r.pixelSizeUm, r.minConfidence, r.windowSigmaPx, r.maxLevels, r.overlays]);
  return createHash('sha256').update(key).digest('hex').slice(0, 16);
}

function summaryJson(s: FlowSummary): Record<string, number | null> {
  return {
    coverage: s.coverage,
    vectors: s.vectors,
    mean_speed_per_s: s.meanSpeedPerS,
    p95_speed_per_s: s.p95SpeedPerS,
    mean_vx_per_s: s.meanVxPerS,
    mean_up_per_s: s.meanUpPerS,
    mean_divergence_per_s: s.meanDivergencePerS,
    mean_vorticity_per_s: s.meanVorticityPerS,
    rms_vorticity_per_s: s.rmsVorticityPerS,
    mean_thinning_nm_per_s: s.meanThinningNmPerS,
  };
}

function summaryFromJson(j: Record<string, unknown>): FlowSummary {
  const n = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
  return {
    coverage: n(j.coverage) ?? 0,
    vectors: n(j.vectors) ?? 0,
    meanSpeedPerS: n(j.mean_speed_per_s),
    p95SpeedPerS: n(j.p95_speed_per_s),
    meanVxPerS: n(j.mean_vx_per_s),
    meanUpPerS: n(j.mean_up_per_s),
    meanDivergencePerS: n(j.mean_divergence_per_s),
    meanVorticityPerS: n(j.mean_vorticity_per_s),
    rmsVorticityPerS: n(j.rms_vorticity_per_s),
    meanThinningNmPerS: n(j.mean_thinning_nm_per_s),
  };
}

async function readPairRecord(path: string, hash: string): Promise<FlowPairRecord | null> {
  let j: Record<string, unknown>;
  try {
    j = JSON.parse(await readFile(path, 'utf8')) as Record<string, unknown>;
  } catch {
    return null;
  }
  if (j.format !== 'lamella-flow-pair' || j.settings_hash !== hash) return null;
  return {
    frame: String(j.frame), nextFrame: String(j.next_frame), stem: String(j.stem), timeS: Number(j.time_s), dtS: Number(j.dt_s),
    settingsHash: hash, summary: summaryFromJson((j.summary ?? {}) as Record<string, unknown>),
  };
}

async function readGrid(frame: SeriesFrameForFlow, width: number | null, height: number | null, first: SeriesFrameForFlow): Promise<{ data: Float32Array; width: number; height: number }> {
  const g = await readThicknessGrid(frame.thicknessPath);
  if (width !== null && height !== null && (g.width !== width || g.height !== height)) {
    throw new InputError(frame.thicknessPath, `frame is ${g.width}×${g.height}, the series' first frame (${first.name}) is ${width}×${height}: frames of different sizes`);
  }
  return g;
}

async function readStatus(frame: SeriesFrameForFlow, n: number): Promise<Uint8Array | null> {
  try {
    const { data } = decodeNpy(await readFile(frame.statusPath), frame.statusPath);
    return data instanceof Uint8Array && data.length === n ? data : null;
  } catch {
    return null;
  }
}

/** Flow of one pair: writes its files and returns its record. */
async function computePair(
  outDir: string, a: SeriesFrameForFlow, b: SeriesFrameForFlow, first: { data: Float32Array; width: number; height: number },
  second: { data: Float32Array; width: number; height: number }, r: Resolved, hash: string, rangeNm: readonly [number, number], signal?: AbortSignal,
): Promise<FlowPairRecord> {
  const { width, height } = first;
  const n = width * height;
  const dtS = b.timeS - a.timeS;
  const flow = denseFlow(first, second, { windowSigmaPx: r.windowSigmaPx, maxLevels: r.maxLevels, signal });
  const lengthPerPx = r.pixelSizeUm ?? 1;
  const vx = new Float32Array(n);
  const vy = new Float32Array(n);
  const changeRate = new Float32Array(n);
  const interleaved = new Float32Array(2 * n);
  for (let i = 0; i < n; i++) {
    const ok = flow.confidence[i] >= r.minConfidence && Number.isFinite(flow.uPx[i]);
    vx[i] = ok ? (flow.uPx[i] * lengthPerPx) / dtS : NaN;
    vy[i] = ok ? (flow.vPx[i] * lengthPerPx) / dtS : NaN;
    changeRate[i] = ok ? flow.changeNm[i] / dtS : NaN;
    interleaved[2 * i] = vx[i];
    interleaved[2 * i + 1] = vy[i];
  }
  const summary = summariseFlow(vx, vy, changeRate, first.data, width, height, lengthPerPx);
  const paths = pairPaths(outDir, a.stem);
  await atomicWriteFile(paths.npy, encodeNpy(interleaved, [height, width, 2]));
  await atomicWriteFile(paths.confidence, encodeNpy(flow.confidence, [height, width]));
  if (r.overlays) {
    await atomicWriteFile(paths.png, await flowOverlayPng({ thicknessNm: first.data, width, height, vx, vy, rangeNm, unit: r.pixelSizeUm === null ? 'px/s' : 'µm/s', minFullScalePerS: lengthPerPx / dtS }));
  }
  const record = {
    format: 'lamella-flow-pair', version: 1, schema_version: FLOW_SCHEMA_VERSION, lamella_version: LAMELLA_VERSION,
    frame: a.name, next_frame: b.name, stem: a.stem, time_s: a.timeS, dt_s: dtS,
    unit: r.pixelSizeUm === null ? 'px/s' : 'µm/s', pixel_size_um: r.pixelSizeUm, min_confidence: r.minConfidence,
    settings_hash: hash, pyramid_levels: flow.levels, summary: summaryJson(summary),
  };
  await atomicWriteFile(paths.json, Buffer.from(`${JSON.stringify(record, null, 2)}\n`));
  return { frame: a.name, nextFrame: b.name, stem: a.stem, timeS: a.timeS, dtS, settingsHash: hash, summary };
}

function fixed(v: number | null, d: number): string {
  return v === null || !Number.isFinite(v) ? '' : v.toFixed(d);
}

export function formatFlowCsv(pairs: readonly FlowPairRecord[], unit: string): string {
  const u = unit === 'µm/s' ? 'um_per_s' : 'px_per_s';
  const header = ['frame', 'next_frame', 'time_s', 'dt_s', `mean_speed_${u}`, `p95_speed_${u}`, `mean_vx_${u}`, `mean_up_${u}`, 'mean_divergence_per_s', 'mean_vorticity_per_s', 'rms_vorticity_per_s', 'mean_thinning_nm_per_s', 'coverage'];
  const lines = [header.join(',')];
  for (const p of pairs) {
    const s = p.summary;
    lines.push([csvText(p.frame), csvText(p.nextFrame), fixed(p.timeS, 3), fixed(p.dtS, 4), fixed(s.meanSpeedPerS, 4), fixed(s.p95SpeedPerS, 4), fixed(s.meanVxPerS, 4), fixed(s.meanUpPerS, 4),
      fixed(s.meanDivergencePerS, 5), fixed(s.meanVorticityPerS, 5), fixed(s.rmsVorticityPerS, 5), fixed(s.meanThinningNmPerS, 3), fixed(s.coverage, 4)].join(','));
  }
  return `${lines.join('\n')}\n`;
}

export function formatPatchesCsv(rows: readonly PatchRow[], unit: string): string {
  const u = unit === 'µm/s' ? 'um_per_s' : 'px_per_s';
  const lines = [['patch', 'frame', 'time_s', 'area_px', 'area_um2', 'centroid_x_px', 'centroid_y_px', 'min_thickness_nm', `rise_velocity_${u}`].join(',')];
  for (const r of rows) {
    lines.push([String(r.patch), csvText(r.frame), fixed(r.timeS, 3), String(r.areaPx), fixed(r.areaUm2, 2), fixed(r.centroidXPx, 2), fixed(r.centroidYPx, 2), fixed(r.minThicknessNm, 2), fixed(r.riseVelocityPerS, 4)].join(','));
  }
  return `${lines.join('\n')}\n`;
}

/** The 5th–95th percentile of the finite values: the overlays' common colour range. */
function percentileRange(data: Float32Array): [number, number] {
  const xs: number[] = [];
  const stride = Math.max(1, Math.floor(data.length / 20000));
  for (let i = 0; i < data.length; i += stride) if (Number.isFinite(data[i])) xs.push(data[i]);
  if (xs.length === 0) return [0, 1];
  xs.sort((p, q) => p - q);
  return [xs[Math.floor(0.05 * (xs.length - 1))], xs[Math.floor(0.95 * (xs.length - 1))]];
}

/** Runs the flow of the series in `seriesDir`; see the module comment. */
export async function runFlow(seriesDir: string, options: FlowOptions, callbacks: FlowCallbacks = {}): Promise<FlowResult> {
  const series = await readSeriesForFlow(seriesDir);
  const r = resolveOptions(options, series);
  const frames = series.frames;
  const framesFolder = resolve(seriesDir, 'frames');
  if (resolve(options.outDir) === framesFolder) throw new InputError(options.outDir, 'the flow output folder cannot be the series\' frames/ folder');
  const outDir = await ensureOutputDir(options.outDir, { inputs: frames.map((f) => ({ path: f.thicknessPath, role: 'thickness map' })), outputs: [] });
  recoverStagedSets(outDir);
  const unit = r.pixelSizeUm === null ? 'px/s' : 'µm/s';
  const warnings: string[] = [];
  if (series.missing.length > 0) warnings.push(`${series.missing.length} frame(s) of the series have no thickness map and are left out (e.g. ${series.missing[0]}); pairs join the frames on either side`);
  const pairCount = frames.length - 1;
  let lo = 0;
  let hi = pairCount;
  if (options.shard) {
    const { index, count } = options.shard;
    if (!(Number.isInteger(index) && Number.isInteger(count) && index >= 1 && index <= count)) throw new RangeError(`shard must be K/N with 1 <= K <= N, received ${index}/${count}`);
    lo = Math.floor(((index - 1) * pairCount) / count);
    hi = Math.floor((index * pairCount) / count);
  }
  const hashes = frames.slice(0, -1).map((f, k) => pairHash(f, frames[k + 1], r));
  const first = await readGrid(frames[0], series.width, series.height, frames[0]);
  const width = first.width;
  const height = first.height;
  const rangeNm = percentileRange(first.data);
  let computed = 0;
  let skipped = 0;
  let interrupted = false;
  if (!options.aggregateOnly) {
    let prev: { data: Float32Array; width: number; height: number } | null = null;
    for (let k = lo; k < hi; k++) {
      if (callbacks.signal?.aborted) {
        interrupted = true;
        break;
      }
      const a = frames[k];
      const b = frames[k + 1];
      const paths = pairPaths(outDir, a.stem);
      const done = await readPairRecord(paths.json, hashes[k]);
      if (done) {
        skipped++;
        prev = null;
        callbacks.onProgress?.({ done: k - lo + 1, total: hi - lo, pair: a.name, outcome: 'skipped' });
        continue;
      }
      if (!(b.timeS > a.timeS)) throw new InputError(join(seriesDir, 'series.csv'), `frame ${b.name} is not later than ${a.name} (${b.timeS} s after ${a.timeS} s): no velocity`);
      const g1 = prev ?? (await readGrid(a, width, height, frames[0]));
      const g2 = await readGrid(b, width, height, frames[0]);
      // The old record goes first: a pair whose files are half replaced never looks done.
      await rm(paths.json, { force: true });
      try {
        await computePair(outDir, a, b, g1, g2, r, hashes[k], rangeNm, callbacks.signal);
      } catch (error) {
        if (callbacks.signal?.aborted) {
          interrupted = true;
          break;
        }
        throw error;
      }
      prev = g2;
      computed++;
      callbacks.onProgress?.({ done: k - lo + 1, total: hi - lo, pair: a.name, outcome: 'computed' });
    }
  }
  if (interrupted) {
    return { outDir, unit, pairs: [], missingPairs: [], computed, skipped, patches: [], outputs: [], warnings, interrupted };
  }
  // Aggregation: every current pair record in the folder.
  const pairs: FlowPairRecord[] = [];
  const missingPairs: string[] = [];
  for (let k = 0; k < pairCount; k++) {
    const rec = await readPairRecord(pairPaths(outDir, frames[k].stem).json, hashes[k]);
    if (rec) pairs.push(rec);
    else missingPairs.push(frames[k].name);
  }
  if (missingPairs.length > 0) warnings.push(`${missingPairs.length} of ${pairCount} frame pair(s) have no flow yet (e.g. from ${missingPairs[0]}); run the other shards or rerun to complete`);
  let patches: PatchRow[];
  try {
    patches = await trackSeriesPatches(outDir, frames, r, width, height, new Set(pairs.map((p) => p.frame)), callbacks.signal);
  } catch (error) {
    if (!callbacks.signal?.aborted) throw error;
    return { outDir, unit, pairs: [], missingPairs: [], computed, skipped, patches: [], outputs: [], warnings, interrupted: true };
  }
  if (callbacks.signal?.aborted) return { outDir, unit, pairs: [], missingPairs: [], computed, skipped, patches: [], outputs: [], warnings, interrupted: true };
  const outputs = FLOW_AGGREGATES.map((name) => join(outDir, name));
  const record = {
    format: 'lamella-flow', version: 1, schema_version: FLOW_SCHEMA_VERSION, lamella_version: LAMELLA_VERSION,
    series: resolve(seriesDir), method: METHOD_VERSION,
    settings: {
      unit, pixel_size_um: r.pixelSizeUm, thin_below_nm: r.thinBelowNm, min_confidence: r.minConfidence,
      window_sigma_px: r.windowSigmaPx, max_levels: r.maxLevels, min_patch_area_px: r.minPatchAreaPx,
    },
    width, height, range_nm: rangeNm,
    pairs: pairs.map((p) => ({ frame: p.frame, next_frame: p.nextFrame, stem: p.stem, time_s: p.timeS, dt_s: p.dtS, summary: summaryJson(p.summary) })),
    missing_pairs: missingPairs,
    patches: patches.length === 0 ? 0 : Math.max(...patches.map((p) => p.patch)),
    warnings,
  };
  await writeOutputSet(outputs, async (staging) => {
    await atomicWriteFile(join(staging, FLOW_AGGREGATES[0]), Buffer.from(formatFlowCsv(pairs, unit)));
    await atomicWriteFile(join(staging, FLOW_AGGREGATES[1]), Buffer.from(formatPatchesCsv(patches, unit)));
    await atomicWriteFile(join(staging, FLOW_AGGREGATES[2]), Buffer.from(`${JSON.stringify(record, null, 2)}\n`));
  });
  return { outDir, unit, pairs, missingPairs, computed, skipped, patches, outputs, warnings, interrupted: false };
}

/** Thin patches of every frame, linked by the flow where a pair has one (else by position). */
async function trackSeriesPatches(
  outDir: string, frames: readonly SeriesFrameForFlow[], r: Resolved, width: number, height: number, withFlow: ReadonlySet<string>, signal?: AbortSignal,
): Promise<PatchRow[]> {
  if (r.thinBelowNm === null) return [];
  const n = width * height;
  const patchFrames: PatchFrame[] = [];
  const moves: Array<Map<number, [number, number]>> = [];
  for (let k = 0; k < frames.length; k++) {
    signal?.throwIfAborted();
    const f = frames[k];
    const grid = await readGrid(f, width, height, frames[0]);
    const status = (await readStatus(f, n)) ?? statusFromThickness(grid.data);
    const { regions, labels } = findThinRegions(grid.data, status, width, height, r.thinBelowNm, r.pixelSizeUm, r.minPatchAreaPx);
    patchFrames.push({ frame: f.name, timeS: f.timeS, regions });
    const move = new Map<number, [number, number]>();
    if (k + 1 < frames.length && withFlow.has(f.name) && regions.length > 0) {
      const path = pairPaths(outDir, f.stem).npy;
      const { data } = decodeNpy(await readFile(path), path);
      const u = new Float32Array(n);
      const v = new Float32Array(n);
      const dt = frames[k + 1].timeS - f.timeS;
      const perPx = (r.pixelSizeUm ?? 1) / dt;
      for (let i = 0; i < n; i++) {
        u[i] = Number(data[2 * i]) / perPx;
        v[i] = Number(data[2 * i + 1]) / perPx;
      }
      for (const region of regions) move.set(region.id, meanFlowIn(labels, region.id, u, v));
    }
    moves.push(move);
  }
  return trackPatches(patchFrames, (k, region) => moves[k].get(region.id) ?? [0, 0], r.pixelSizeUm ?? 1);
}

function statusFromThickness(t: Float32Array): Uint8Array {
  const s = new Uint8Array(t.length);
  for (let i = 0; i < t.length; i++) s[i] = Number.isFinite(t[i]) ? PixelStatus.ok : PixelStatus.excluded;
  return s;
}
