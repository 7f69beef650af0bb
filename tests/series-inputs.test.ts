/**
 * Planning a series: input expansion (files, folders, globs, natural order, duplicates), frame
 * times from EXIF or a frame rate, shard specs, chunking, and settings fingerprints.
 */
import { describe, expect, it, beforeAll, afterAll } from 'vitest';
import { mkdtemp, mkdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { expandInputs } from '../src/series/expandInputs.js';
import { compareNatural } from '../src/series/naturalOrder.js';
import { assignFrameTimes } from '../src/series/frameTimes.js';
import { parseShard } from '../src/series/parseShard.js';
import { chunkFrames, shardChunks } from '../src/series/chunkFrames.js';
import { canonicalJson, settingsHash } from '../src/series/settingsHash.js';
import type { FrameJob } from '../src/series/types.js';

let dir: string;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-inputs-'));
  await mkdir(join(dir, 'shots'));
  for (const name of ['img10.jpg', 'img2.jpg', 'img1.jpg', 'notes.txt', 'IMG3.PNG']) await writeFile(join(dir, 'shots', name), 'x');
  await mkdir(join(dir, 'shots', 'sub.jpg'));
  await mkdir(join(dir, 'empty'));
  await mkdir(join(dir, 'other'));
  await writeFile(join(dir, 'other', 'img1.jpg'), 'x');
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('compareNatural()', () => {
  it('orders embedded numbers by value (frame2 before frame10)', () => {
    expect(['frame10', 'frame2', 'frame1'].sort(compareNatural)).toEqual(['frame1', 'frame2', 'frame10']);
  });
});

describe('expandInputs()', () => {
  it('takes a folder\'s image files (not subfolders, not other files) in natural order', async () => {
    const { frames } = await expandInputs(['shots'], dir);
    expect(frames.map((f) => f.name)).toEqual(['img1.jpg', 'img2.jpg', 'IMG3.PNG', 'img10.jpg']);
    expect(frames.map((f) => f.index)).toEqual([0, 1, 2, 3]);
    expect(frames[3].stem).toBe('img10');
  });
  it('expands glob patterns and removes files named twice', async () => {
    const { frames, warnings } = await expandInputs(['shots/img*.jpg', 'shots/img2.jpg'], dir);
    expect(frames.map((f) => f.name)).toEqual(['img1.jpg', 'img2.jpg', 'img10.jpg']);
    expect(warnings).toEqual(['1 input file(s) named more than once were taken once']);
  });
  it('warns about an empty folder and a pattern that matches nothing', async () => {
    const { frames, warnings } = await expandInputs(['empty', 'nothing*.jpg'], dir);
    expect(frames).toEqual([]);
    expect(warnings[0]).toMatch(/^input folder empty holds no image files/);
    expect(warnings[1]).toBe('input nothing*.jpg matches no file');
  });
  it('refuses two frames whose outputs would share a name', async () => {
    await expect(expandInputs(['shots/img1.jpg', 'other/img1.jpg'], dir)).rejects.toThrow(/share the name stem "img1"/);
  });
});

describe('assignFrameTimes()', () => {
  // Times in ms after an invented but plausible first capture (2024-05-01 10:00:00).
  const T0 = Date.UTC(2024, 4, 1, 10, 0, 0);
  const named = (times: Array<number | null>) => times.map((t, i) => ({ name: `f${i}.jpg`, exifTimeMs: t === null ? null : T0 + t }));
  it('uses EXIF capture times relative to the first frame, with sub-seconds', () => {
    const result = assignFrameTimes(named([1_000_000_250, 1_000_000_750, 1_000_001_250]));
    expect(result.timesS).toEqual([0, 0.5, 1]);
    expect(result.source).toBe('exif');
    expect(result.warnings).toEqual([]);
  });
  it('uses the frame rate when no frame has an EXIF time: t = i / fps', () => {
    expect(assignFrameTimes(named([null, null, null]), 4).timesS).toEqual([0, 0.25, 0.5]);
    expect(assignFrameTimes(named([null, null]), null, 1.5).timesS).toEqual([0, 1.5]);
  });
  it('fails without EXIF times and without fps or interval', () => {
    expect(() => assignFrameTimes(named([null, null]))).toThrow(/no frame has an EXIF capture time/);
  });
  it('refuses fps and interval together, and non-positive values', () => {
    expect(() => assignFrameTimes(named([null]), 2, 0.5)).toThrow(/either fps or intervalS/);
    expect(() => assignFrameTimes(named([null]), 0)).toThrow('fps must be a finite number > 0, received 0');
    expect(() => assignFrameTimes(named([null]), null, -1)).toThrow('intervalS must be a finite number > 0, received -1');
  });
  it('ignores a frame rate when every frame has an EXIF time, with a warning', () => {
    const result = assignFrameTimes(named([0, 2000]), 10);
    expect(result.timesS).toEqual([0, 2]);
    expect(result.warnings[0]).toMatch(/frame rate \/ interval given is ignored/);
  });
  it('mixed EXIF and non-EXIF frames with a frame rate: all frames timed by frame rate, missing ones named', () => {
    const result = assignFrameTimes(named([0, null, 5000]), 2);
    expect(result.timesS).toEqual([0, 0.5, 1]);
    expect(result.warnings[0]).toMatch(/without an EXIF capture time: f1\.jpg/);
  });
  it('mixed EXIF and non-EXIF frames without a frame rate: missing times interpolated by frame number', () => {
    const result = assignFrameTimes(named([null, 1000, null, 3000, null]));
    expect(result.timesS).toEqual([0, 1, 2, 3, 4]);
    expect(result.source).toBe('exif+interpolated');
    expect(result.warnings[0]).toMatch(/f0\.jpg, f2\.jpg, f4\.jpg; their times are interpolated/);
  });
  it('duplicate EXIF times are kept and named, or replaced by the frame rate when one is given', () => {
    const kept = assignFrameTimes(named([0, 1000, 1000, 2000]));
    expect(kept.timesS).toEqual([0, 1, 1, 2]);
    expect(kept.warnings[0]).toMatch(/same EXIF capture time.*f1\.jpg=f2\.jpg/);
    const uniform = assignFrameTimes(named([0, 1000, 1000, 2000]), 2);
    expect(uniform.timesS).toEqual([0, 0.5, 1, 1.5]);
    expect(uniform.warnings[0]).toMatch(/same EXIF capture time: f1\.jpg=f2\.jpg; all frames timed from the frame rate/);
  });
  it('times that run backwards are implausible: an error without a frame rate, the frame rate with one', () => {
    expect(() => assignFrameTimes(named([0, 3000, 2000]))).toThrow('frame times: implausible EXIF capture times: f2.jpg (taken 1.00 s before f1.jpg); give fps or intervalS to time the frames uniformly');
    const result = assignFrameTimes(named([0, 3000, 2000]), 2);
    expect(result.timesS).toEqual([0, 0.5, 1]);
    expect(result.source).toBe('fps');
    expect(result.warnings).toEqual(['implausible EXIF capture times: f2.jpg (taken 1.00 s before f1.jpg); all frames timed from the frame rate instead of EXIF']);
  });
  it('impossible, too early, future and decades-apart times are implausible and named', () => {
    const impossible = [{ name: 'a.jpg', exifTimeMs: T0 }, { name: 'b.jpg', exifTimeMs: null, exifProblem: 'impossible DateTimeOriginal' }];
    expect(() => assignFrameTimes(impossible)).toThrow(/implausible EXIF capture times: b\.jpg \(impossible DateTimeOriginal\); give fps or intervalS/);
    expect(assignFrameTimes(impossible, null, 2).timesS).toEqual([0, 2]);
    const year9999 = [{ name: 'a.jpg', exifTimeMs: T0 }, { name: 'b.jpg', exifTimeMs: Date.UTC(9999, 0, 1) }];
    expect(() => assignFrameTimes(year9999)).toThrow(/b\.jpg \(taken 9999-01-01 00:00:00\)/);
    const year1980 = [{ name: 'a.jpg', exifTimeMs: Date.UTC(1980, 0, 1) }, { name: 'b.jpg', exifTimeMs: Date.UTC(1980, 0, 1, 0, 0, 1) }];
    expect(() => assignFrameTimes(year1980)).toThrow(/a\.jpg \(taken 1980-01-01 00:00:00\), b\.jpg/);
    // A clock 30 years off in one frame of a 1 s series (invented).
    const back = -30 * 365.25 * 86_400_000;
    const decades = named([back, back + 1000, back + 2000, 0, 1000]);
    expect(() => assignFrameTimes(decades)).toThrow(/implausible EXIF capture times: f3\.jpg \(1\.10e\+4 days after f2\.jpg\); give fps/);
    // A day-long time-lapse with a steady step is plausible.
    expect(assignFrameTimes(named([0, 3_600_000, 7_200_000])).timesS).toEqual([0, 3600, 7200]);
  });
});

describe('parseShard()', () => {
  it('reads K/N', () => {
    expect(parseShard('2/5')).toEqual({ index: 2, count: 5 });
    expect(parseShard('1/1')).toEqual({ index: 1, count: 1 });
  });
  it.each(['3/2', '0/2', 'a/b', '1/0', '2', '-1/2', '1.5/2'])('refuses %s with a message naming it', (spec) => {
    expect(() => parseShard(spec)).toThrow(new RegExp(`shard must be K/N .*received "${spec.replace('.', '\\.')}"`));
  });
});

describe('chunkFrames() and shardChunks()', () => {
  const jobs: FrameJob[] = Array.from({ length: 23 }, (_, i) => ({ index: i, path: `/f${i}`, name: `f${i}`, stem: `f${i}` }));
  it('cuts every chunkFrames-th frame, independent of workers or shards', () => {
    expect(chunkFrames(jobs, 10).map((c) => c.length)).toEqual([10, 10, 3]);
    expect(chunkFrames([], 10)).toEqual([]);
    expect(() => chunkFrames(jobs, 0)).toThrow('chunkFrames must be a whole number >= 1, received 0');
  });
  it('shards are contiguous runs of whole chunks that together cover every frame once', () => {
    const chunks = chunkFrames(jobs, 4);
    for (const count of [1, 2, 3, 6, 9]) {
      const all = Array.from({ length: count }, (_, k) => shardChunks(chunks, { index: k + 1, count }).flat().map((f) => f.index)).flat();
      expect(all).toEqual(jobs.map((f) => f.index));
    }
  });
});

describe('settingsHash()', () => {
  it('does not depend on key order and changes with any value', () => {
    expect(canonicalJson({ b: 1, a: [1, { d: 2, c: 3 }] })).toBe('{"a":[1,{"c":3,"d":2}],"b":1}');
    expect(settingsHash({ a: 1, b: 'x' })).toBe(settingsHash({ b: 'x', a: 1 }));
    expect(settingsHash({ a: 1, b: 'x' })).not.toBe(settingsHash({ a: 1, b: 'y' }));
    expect(settingsHash({})).toMatch(/^[0-9a-f]{16}$/);
  });
});

describe('progress text', async () => {
  const { formatDuration, formatProgressBar, formatProgressLine } = await import('../src/series/progressText.js');
  const p = { done: 10, total: 40, mapped: 8, skipped: 1, failed: 1, elapsedMs: 5000 };
  it('formatDuration() gives mm:ss, h:mm:ss past an hour, and --:-- when unknown', () => {
    expect(formatDuration(75)).toBe('01:15');
    expect(formatDuration(3725)).toBe('1:02:05');
    expect(formatDuration(Number.NaN)).toBe('--:--');
  });
  it('formatProgressBar() shows frames done/total, rate and time left (remaining / rate)', () => {
    expect(formatProgressBar(p, 8)).toBe('[##------] 10/40 frames  2.0 frames/s  00:15 left  (1 skipped, 1 failed)');
  });
  it('formatProgressLine() is a plain log line', () => {
    expect(formatProgressLine(p)).toBe('series: 10/40 frames (25%), 2.0 frames/s, about 00:15 left, 1 skipped, 1 failed');
  });
});
