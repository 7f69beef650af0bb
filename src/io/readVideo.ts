/**
 * Video files through FFmpeg (./ffmpegBinary.ts), streamed, never extracted to disk.
 *
 * `probeVideo` lists the first video stream's frames without decoding them: FFmpeg copies the
 * stream's packets into its `framecrc` listing, whose presentation timestamps, sorted, are the
 * frames' times (B-frames arrive out of order). Size, pixel format and the file's start time come
 * from FFmpeg's stream description.
 *
 * `readVideoFrames` decodes a run of frames: FFmpeg seeks just before the first one (accurate
 * input seeking: decode from the key frame before, drop frames before the position), keeps the
 * original timestamps (`-copyts`), and pipes raw RGB (8-bit, or 16-bit for sources of more than 8
 * bits) to us; the `showinfo` filter reports each frame's timestamp and size on stderr, so each
 * frame is matched to its place in the probe by time, not by counting. A frame whose size differs
 * from the stream's, or frames a truncated file never delivers, come back as errors for those
 * frames only.
 */
import { spawn } from 'node:child_process';
import { InputError } from '../errors.js';
import { findFfmpeg, NO_FFMPEG_TEXT } from './ffmpegBinary.js';
import { photoFromRaw } from './photoFromRaw.js';
import type { Photo } from './photo.js';

/** File name suffixes taken as video (anything FFmpeg reads works; these are recognised by name). */
export const VIDEO_EXTENSIONS = ['.mp4', '.mov', '.avi', '.mkv', '.webm', '.m4v', '.mpg', '.mpeg', '.wmv', '.mts', '.m2ts'];

export interface VideoInfo {
  readonly width: number;
  readonly height: number;
  /** Each frame's presentation time, seconds, on the file's clock, ascending. */
  readonly ptsS: number[];
  /** The file's start time, seconds (FFmpeg's `start:`), which its seek positions count from. */
  readonly startS: number;
  readonly codec: string;
  readonly pixelFormat: string;
  /** 16 when the source has more than 8 bits per sample (e.g. yuv420p10le, gbrp16le). */
  readonly bitDepth: 8 | 16;
  /** FFmpeg's complaint when the file ends early or is damaged (the frames listed are those before it), else null. */
  readonly damage: string | null;
}

function ffmpegOrThrow(path: string): string {
  const ffmpeg = findFfmpeg();
  if (!ffmpeg) throw new InputError(path, NO_FFMPEG_TEXT);
  return ffmpeg;
}

function run(ffmpeg: string, args: string[]): Promise<{ code: number | null; stdout: string; stderr: string }> {
  return new Promise((resolveRun, reject) => {
    const child = spawn(ffmpeg, args, { stdio: ['ignore', 'pipe', 'pipe'] });
    const out: Buffer[] = [];
    const err: Buffer[] = [];
    child.stdout.on('data', (b: Buffer) => out.push(b));
    child.stderr.on('data', (b: Buffer) => err.push(b));
    child.on('error', reject);
    child.on('close', (code) => resolveRun({ code, stdout: Buffer.concat(out).toString('utf8'), stderr: Buffer.concat(err).toString('utf8') }));
  });
}

/** FFmpeg's last meaningful complaint, one line. */
function lastComplaint(stderr: string, path = ''): string {
  const lines = stderr.split(/\r?\n/).map((l) => l.trim()).filter((l) => l && !/^(ffmpeg version|built with|configuration:|lib\w+ +\d)/.test(l));
  const line = (lines[lines.length - 1] ?? 'no message').replace(/^\[[^\]]+\]\s*/, '');
  return path && line.startsWith(`${path}: `) ? line.slice(path.length + 2) : line;
}

export async function probeVideo(path: string): Promise<VideoInfo> {
  const ffmpeg = ffmpegOrThrow(path);
  const { code, stdout, stderr } = await run(ffmpeg, ['-hide_banner', '-nostdin', '-i', path, '-map', '0:v:0', '-c', 'copy', '-f', 'framecrc', '-']);
  const stream = /Stream #\d+:\d+[^:]*: Video: ([^,\s]+)[^,]*, ([a-z0-9_]+)(?:\([^)]*\))?, (\d+)x(\d+)/.exec(stderr);
  if (!stream) {
    if (/Invalid data found|could not find codec|moov atom not found|Invalid argument|No such file/i.test(stderr) || code !== 0) {
      throw new InputError(path, `FFmpeg cannot read it as a video (${lastComplaint(stderr, path)})`);
    }
    throw new InputError(path, 'holds no video stream');
  }
  const tb = /#tb 0: (\d+)\/(\d+)/.exec(stdout);
  const unit = tb ? Number(tb[1]) / Number(tb[2]) : NaN;
  const pts: number[] = [];
  for (const line of stdout.split('\n')) {
    const m = /^0,\s*(-?\d+),\s*(-?\d+),/.exec(line);
    if (m) pts.push(Number(m[2]) * unit);
  }
  if (pts.length === 0 || !Number.isFinite(unit)) throw new InputError(path, 'holds no video frames');
  pts.sort((a, b) => a - b);
  const start = /Duration: [^,]+, start: (-?[\d.]+)/.exec(stderr);
  const pixelFormat = stream[2];
  const deep = /(9|10|12|14|16)(le|be)$/.test(pixelFormat) || /^(rgb48|bgr48|rgba64|bgra64)/.test(pixelFormat);
  return {
    codec: stream[1],
    pixelFormat,
    width: Number(stream[3]),
    height: Number(stream[4]),
    ptsS: pts,
    startS: start ? Number(start[1]) : pts[0],
    bitDepth: deep ? 16 : 8,
    damage: damageOf(stderr),
  };
}

/** FFmpeg's words for a file that ends early or holds damaged packets (demuxer and decoder messages). */
const DAMAGE = /(Read error|Truncat\w+|ended prematurely|Packet corrupt|corrupt (?:input|packet|decoded frame)|Invalid NAL unit|error while decoding|Error while decoding|partial file|End of file)[^\n]*/;

function damageOf(stderr: string): string | null {
  const m = DAMAGE.exec(stderr);
  return m ? m[0].replace(/^\[[^\]]+\]\s*/, '').trim() : null;
}

/** Half the smallest gap between neighbouring frames (seconds): the tolerance for matching times. */
function halfGapS(ptsS: readonly number[]): number {
  let gap = Infinity;
  for (let i = 1; i < ptsS.length; i++) if (ptsS[i] - ptsS[i - 1] > 0) gap = Math.min(gap, ptsS[i] - ptsS[i - 1]);
  return Number.isFinite(gap) ? gap / 2 : 0.5;
}

export type VideoFrameResult = { readonly index: number; readonly photo: Photo } | { readonly index: number; readonly error: Error };

/**
 * Decodes the frames at `indices` (ascending indices into `info.ptsS`), yielding each as a photo
 * or an error (a truncated file, a frame of another size) in order.
 */
export async function* readVideoFrames(path: string, info: VideoInfo, indices: readonly number[]): AsyncGenerator<VideoFrameResult> {
  if (indices.length === 0) return;
  const ffmpeg = ffmpegOrThrow(path);
  const first = indices[0];
  const last = indices[indices.length - 1];
  const tolerance = halfGapS(info.ptsS);
  // Seek a frame and a half early: frames before the first wanted one are recognised by time and dropped.
  const seekS = first === 0 ? 0 : Math.max(0, info.ptsS[first] - info.startS - 3 * tolerance);
  const count = last - first + 4;
  const frameBytes = info.width * info.height * 3 * (info.bitDepth === 16 ? 2 : 1);
  const args = ['-hide_banner', '-nostdin', '-copyts', ...(seekS > 0 ? ['-ss', seekS.toFixed(6)] : []), '-i', path, '-map', '0:v:0',
    '-vf', 'showinfo', '-frames:v', String(count), '-vsync', '0', '-f', 'rawvideo', '-pix_fmt', info.bitDepth === 16 ? 'rgb48le' : 'rgb24', 'pipe:1'];
  const child = spawn(ffmpeg, args, { stdio: ['ignore', 'pipe', 'pipe'] });
  const frames: Buffer[] = [];
  const shown: Array<{ ptsS: number; size: string }> = [];
  let pending: Buffer = Buffer.alloc(0);
  let stderrTail = '';
  let errText = '';
  let done = false;
  let wake: (() => void) | null = null;
  const notify = (): void => {
    const w = wake;
    wake = null;
    w?.();
  };
  child.stdout.on('data', (chunk: Buffer) => {
    pending = pending.length === 0 ? chunk : Buffer.concat([pending, chunk]);
    while (pending.length >= frameBytes) {
      frames.push(Buffer.from(pending.subarray(0, frameBytes)));
      pending = pending.subarray(frameBytes);
    }
    notify();
  });
  child.stderr.on('data', (chunk: Buffer) => {
    const text = stderrTail + chunk.toString('utf8');
    const lines = text.split('\n');
    stderrTail = lines.pop() ?? '';
    for (const line of lines) {
      const m = /showinfo.*\bn:\s*\d+\s+pts:\s*-?\d+\s+pts_time:(-?[\d.e+-]+).*\bs:(\d+x\d+)/.exec(line);
      if (m) shown.push({ ptsS: Number(m[1]), size: m[2] });
      else errText += `${line}\n`;
    }
    notify();
  });
  child.on('close', () => {
    done = true;
    notify();
  });
  child.on('error', (error) => {
    errText += String(error);
    done = true;
    notify();
  });
  let want = 0;
  let k = 0;
  try {
    while (want < indices.length) {
      if (k < frames.length && k < shown.length) {
        const { ptsS, size } = shown[k];
        const buffer = frames[k];
        frames[k] = Buffer.alloc(0);
        k++;
        const index = indices[want];
        const target = info.ptsS[index];
        if (ptsS < target - tolerance) continue; // before the wanted frame (the early seek, or a frame skipped by --every)
        if (ptsS > target + tolerance) {
          yield { index, error: new Error(`frame at ${target.toFixed(3)} s was not delivered by the decoder (next frame at ${ptsS.toFixed(3)} s)`) };
          want++;
          k--; // look at this frame again for the next wanted index
          continue;
        }
        want++;
        if (size !== `${info.width}x${info.height}`) {
          yield { index, error: new Error(`frame is ${size.replace('x', '×')}, the video's frames are ${info.width}×${info.height} (a video that changes size mid-way)`) };
          continue;
        }
        yield { index, photo: photoFromRaw(buffer, info.width, info.height, info.bitDepth, `video/${info.codec}`) };
        continue;
      }
      if (done && (k >= frames.length || k >= shown.length)) break;
      await new Promise<void>((resolveWait) => {
        wake = resolveWait;
        if (done || (k < frames.length && k < shown.length)) notify();
      });
    }
  } finally {
    if (!done) child.kill('SIGKILL');
  }
  // Frames the decoder never delivered: a truncated or damaged file.
  const why = lastComplaint(errText);
  for (; want < indices.length; want++) {
    yield { index: indices[want], error: new Error(`the decoder stopped before this frame (the video may be truncated or damaged: ${why})`) };
  }
}
