/**
 * Time of each frame in seconds, the first frame at 0. Rules (our own, stated in the README):
 * 1. Every frame has an EXIF capture time (DateTimeOriginal + SubSecTimeOriginal): EXIF times are
 *    used; `fps`/`intervalS` given as well are ignored with a warning. Exception: if two frames
 *    share a capture time (EXIF without sub-seconds records whole seconds) and `fps`/`intervalS`
 *    is given, the uniform spacing is used for all frames instead, with a warning.
 * 2. No frame has an EXIF time: t_i = i / fps or i · intervalS; neither given is an error.
 * 3. Some frames lack an EXIF time: with `fps`/`intervalS`, uniform spacing for all frames; without,
 *    the missing times are interpolated linearly by frame number between the nearest frames with
 *    EXIF times (extrapolated at the ends with the median EXIF step); a warning names the frames.
 * 4. EXIF times that are implausible — impossible fields, a year before 1990 or in the future,
 *    times that run backwards, or a step between neighbours longer than a day and more than 1000
 *    times the median step (a clock decades off) — are never used: with `fps`/`intervalS` all
 *    frames are timed uniformly (a warning names the frames), without them it is an error that
 *    says to give one.
 * Duplicate times that remain are kept and named in warnings.
 */

/** Earliest plausible capture time (1990-01-01T00:00:00Z, before consumer digital cameras), ms. */
const EARLIEST_PLAUSIBLE_MS = Date.UTC(1990, 0, 1);
const DAY_MS = 86_400_000;

/** Frames whose EXIF times cannot be right, each with the reason ("name (reason)"). */
function implausibleTimes(frames: readonly FrameTimingInput[], nowMs: number): string[] {
  const found: string[] = [];
  const pad = (t: number): string => new Date(t).toISOString().slice(0, 19).replace('T', ' ');
  for (const f of frames) {
    if (f.exifProblem) found.push(`${f.name} (${f.exifProblem})`);
    else if (f.exifTimeMs !== null && (f.exifTimeMs < EARLIEST_PLAUSIBLE_MS || f.exifTimeMs > nowMs + DAY_MS)) found.push(`${f.name} (taken ${pad(f.exifTimeMs)})`);
  }
  if (found.length > 0) return found;
  const timed = frames.flatMap((f, i) => (f.exifTimeMs === null ? [] : [{ f, i, t: f.exifTimeMs }]));
  const steps = timed.slice(1).map((cur, j) => ({ name: cur.f.name, previous: timed[j].f.name, stepMs: (cur.t - timed[j].t) / (cur.i - timed[j].i) }));
  for (const s of steps) if (s.stepMs < 0) found.push(`${s.name} (taken ${((-s.stepMs) / 1000).toPrecision(3)} s before ${s.previous})`);
  if (steps.length >= 2) {
    const typical = median(steps.map((s) => Math.abs(s.stepMs)));
    for (const s of steps) {
      if (s.stepMs > DAY_MS && s.stepMs > 1000 * Math.max(typical, 1)) found.push(`${s.name} (${(s.stepMs / DAY_MS).toPrecision(3)} days after ${s.previous})`);
    }
  }
  return found;
}

export interface FrameTimingInput {
  readonly name: string;
  /** Capture time from EXIF in ms since the epoch (any fixed origin), or null when absent. */
  readonly exifTimeMs: number | null;
  /** Set when the frame has an EXIF capture time that is impossible (then exifTimeMs is null). */
  readonly exifProblem?: string | null;
}

export interface FrameTiming {
  readonly timesS: number[];
  readonly source: 'exif' | 'fps' | 'exif+interpolated';
  readonly warnings: string[];
}

function listNames(names: readonly string[], max = 5): string {
  return names.length <= max ? names.join(', ') : `${names.slice(0, max).join(', ')} and ${names.length - max} more`;
}

function uniformStepS(fps: number | null, intervalS: number | null): number | null {
  if (fps !== null && intervalS !== null) throw new RangeError(`give either fps or intervalS, not both (received fps ${fps}, intervalS ${intervalS})`);
  if (fps !== null) {
    if (!Number.isFinite(fps) || fps <= 0) throw new RangeError(`fps must be a finite number > 0, received ${fps}`);
    return 1 / fps;
  }
  if (intervalS !== null) {
    if (!Number.isFinite(intervalS) || intervalS <= 0) throw new RangeError(`intervalS must be a finite number > 0, received ${intervalS}`);
    return intervalS;
  }
  return null;
}

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

function interpolate(frames: readonly FrameTimingInput[]): number[] {
  const known = frames.flatMap((f, i) => (f.exifTimeMs === null ? [] : [i]));
  const steps = known.slice(1).map((k, j) => (frames[k].exifTimeMs! - frames[known[j]].exifTimeMs!) / (k - known[j]));
  const stepMs = median(steps);
  return frames.map((f, i) => {
    if (f.exifTimeMs !== null) return f.exifTimeMs;
    const after = known.find((k) => k > i);
    const before = [...known].reverse().find((k) => k < i);
    if (before === undefined) return frames[after!].exifTimeMs! - (after! - i) * stepMs;
    if (after === undefined) return frames[before].exifTimeMs! + (i - before) * stepMs;
    const w = (i - before) / (after - before);
    return frames[before].exifTimeMs! * (1 - w) + frames[after].exifTimeMs! * w;
  });
}

function duplicateNames(frames: readonly FrameTimingInput[], timesMs: readonly number[]): string[] {
  return frames.flatMap((f, i) => (i > 0 && timesMs[i] === timesMs[i - 1] ? [`${frames[i - 1].name}=${f.name}`] : []));
}

export function assignFrameTimes(
  frames: readonly FrameTimingInput[],
  fps: number | null = null,
  intervalS: number | null = null,
): FrameTiming {
  const stepS = uniformStepS(fps, intervalS);
  const warnings: string[] = [];
  const uniform = (): number[] => frames.map((_, i) => i * stepS!);
  if (frames.length === 0) return { timesS: [], source: stepS === null ? 'exif' : 'fps', warnings };
  const implausible = implausibleTimes(frames, Date.now());
  if (implausible.length > 0) {
    if (stepS === null) {
      throw new RangeError(`frame times: implausible EXIF capture times: ${listNames(implausible, 3)}; give fps or intervalS to time the frames uniformly`);
    }
    warnings.push(`implausible EXIF capture times: ${listNames(implausible, 3)}; all frames timed from the frame rate instead of EXIF`);
    return { timesS: uniform(), source: 'fps', warnings };
  }
  const missing = frames.filter((f) => f.exifTimeMs === null).map((f) => f.name);
  if (missing.length === frames.length) {
    if (stepS === null) throw new RangeError(`frame times: no frame has an EXIF capture time (DateTimeOriginal); give fps or intervalS`);
    return { timesS: uniform(), source: 'fps', warnings };
  }
  if (missing.length > 0) {
    if (stepS !== null) {
      warnings.push(`frames without an EXIF capture time: ${listNames(missing)}; all frames timed from the frame rate instead of EXIF`);
      return { timesS: uniform(), source: 'fps', warnings };
    }
    if (frames.length - missing.length < 2) {
      throw new RangeError(`frame times: only one frame has an EXIF capture time (${missing.length} lack one, e.g. ${missing[0]}); give fps or intervalS`);
    }
    warnings.push(`frames without an EXIF capture time: ${listNames(missing)}; their times are interpolated by frame number`);
  }
  const timesMs = missing.length > 0 ? interpolate(frames) : frames.map((f) => f.exifTimeMs!);
  const duplicates = duplicateNames(frames, timesMs);
  if (duplicates.length > 0 && stepS !== null) {
    warnings.push(`frames with the same EXIF capture time: ${listNames(duplicates)}; all frames timed from the frame rate instead of EXIF`);
    return { timesS: uniform(), source: 'fps', warnings };
  }
  if (stepS !== null) warnings.push(`every frame has an EXIF capture time; the frame rate / interval given is ignored`);
  if (duplicates.length > 0) warnings.push(`frames with the same EXIF capture time (kept; give fps or intervalS to time frames uniformly): ${listNames(duplicates)}`);
  const originMs = timesMs[0];
  return { timesS: timesMs.map((t) => (t - originMs) / 1000), source: missing.length > 0 ? 'exif+interpolated' : 'exif', warnings };
}
