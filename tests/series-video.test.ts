// `lamella series` on a video file and on a multi-page TIFF stack, as on a folder of frames.
// The frames are invented (a foam lab's draining soap film, rendered by our own forward model with
// noise and an unknown exposure); the videos are made from them with FFmpeg here: FFV1, a lossless
// codec (IETF RFC 9043, 2021: decoding returns the encoded samples exactly), for exact round
// trips at 8 and 16 bits, and H.264 (ITU-T H.264) at high quality for the realistic lossy case.
// Skipped, with the reason printed, only where no FFmpeg is available.
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { encodeNpy } from '../src/io/encodeNpy.js';
import { encodeTiffStack } from '../src/io/encodeImage.js';
import { findFfmpeg } from '../src/io/ffmpegBinary.js';
import { readPhoto } from '../src/io/readPhoto.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-video-'));
const ffmpeg = findFfmpeg();
if (!ffmpeg) console.warn('series-video tests skipped: no FFmpeg (neither on the PATH nor the optional @ffmpeg-installer/ffmpeg package)');
const W = 160;
const H = 120;
const FRAMES = 8;

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: dir });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

function encode(args: string[]): void {
  const r = spawnSync(ffmpeg!, ['-hide_banner', '-loglevel', 'error', '-y', ...args], { cwd: dir, encoding: 'utf8' });
  expect(r.status, r.stderr).toBe(0);
}

function csvRows(out: string): string[][] {
  return readFileSync(join(dir, out, 'series.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
}

beforeAll(async () => {
  if (!ffmpeg) return;
  mkdirSync(join(dir, 'png'));
  mkdirSync(join(dir, 'tif'));
  for (let f = 0; f < FRAMES; f++) {
    const t = new Float32Array(W * H);
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) t[y * W + x] = (60 + 900 * Math.pow(y / (H - 1), 1.3)) * (1 - 0.05 * f) + 20 * Math.sin(x / 15 + (y - 3 * f) / 30);
    writeFileSync(join(dir, `t${f}.npy`), encodeNpy(t, [H, W]));
    for (const [folder, ext] of [['png', 'png'], ['tif', 'tif']]) {
      const r = lamella('render', `t${f}.npy`, '--stack', 'soap-film', '--light', 'D65', '--exposure', '7', '--noise', '0.003', '--out', `${folder}/frame-${f}.${ext}`);
      expect(r.status, r.stderr).toBe(0);
    }
  }
  // 4 frames a second; FFV1 keeps every sample (bgr0 for 8 bits, gbrp16le for 16).
  encode(['-framerate', '4', '-i', 'png/frame-%d.png', '-c:v', 'ffv1', '-pix_fmt', 'bgr0', 'run8.mkv']);
  encode(['-framerate', '4', '-i', 'tif/frame-%d.tif', '-c:v', 'ffv1', '-pix_fmt', 'gbrp16le', 'run16.mkv']);
  encode(['-framerate', '4', '-i', 'png/frame-%d.png', '-c:v', 'libx264', '-crf', '12', '-pix_fmt', 'yuv420p', 'run.mp4']);
  const pages = [];
  for (let f = 0; f < FRAMES; f++) {
    const p = await readPhoto(join(dir, 'tif', `frame-${f}.tif`));
    pages.push({ data: Uint16Array.from(p.rgb, (v) => Math.round(v * 65535)), width: W, height: H, channels: 3 as const });
  }
  writeFileSync(join(dir, 'stack.tif'), await encodeTiffStack(pages));
  const whole = readFileSync(join(dir, 'run8.mkv'));
  writeFileSync(join(dir, 'cut.mkv'), whole.subarray(0, Math.floor(whole.length * 0.45)));
  writeFileSync(join(dir, 'junk.mp4'), 'not a video at all\n');
}, 180_000);

const base = ['--stack', 'soap-film', '--light', 'D65', '--quiet', '--no-report'];

describe.skipIf(!ffmpeg)('series from a video or an image stack', () => {
  it('a lossless 8-bit video maps exactly as the folder of its frames; names <file>#<index>; times from the video\'s timestamps', () => {
    expect(lamella('series', 'png', ...base, '--fps', '4', '--out', 'folder8').status).toBe(0);
    const r = lamella('series', 'run8.mkv', ...base, '--out', 'video8');
    expect(r.status, r.stderr).toBe(0);
    const folder = csvRows('folder8');
    const video = csvRows('video8');
    expect(video.map((row) => row[0])).toEqual(Array.from({ length: FRAMES }, (_, f) => `run8.mkv#${f}`));
    expect(video.map((row) => Number(row[1]))).toEqual(Array.from({ length: FRAMES }, (_, f) => f * 0.25));
    expect(video.map((row) => row.slice(2))).toEqual(folder.map((row) => row.slice(2)));
    expect(readdirSync(join(dir, 'video8', 'frames'))).toContain('run8-0007.json');
  }, 180_000);

  it('a lossless 16-bit video and a 16-bit multi-page TIFF stack stay 16-bit: both map as the folder of 16-bit TIFFs', () => {
    expect(lamella('series', 'tif', ...base, '--fps', '4', '--out', 'folder16').status).toBe(0);
    const video = lamella('series', 'run16.mkv', ...base, '--out', 'video16');
    expect(video.status, video.stderr).toBe(0);
    const stack = lamella('series', 'stack.tif', ...base, '--fps', '4', '--out', 'stack16');
    expect(stack.status, stack.stderr).toBe(0);
    const folder = csvRows('folder16').map((row) => row.slice(1));
    expect(csvRows('video16').map((row) => row.slice(1))).toEqual(folder);
    expect(csvRows('stack16').map((row) => row.slice(1))).toEqual(folder);
  }, 180_000);

  it('an H.264 video (lossy, 4:2:0) maps each frame\'s mean within 3 nm of the lossless frames', () => {
    const r = lamella('series', 'run.mp4', ...base, '--out', 'h264');
    expect(r.status, r.stderr).toBe(0);
    const folder = csvRows('folder8');
    const lossy = csvRows('h264');
    expect(lossy).toHaveLength(FRAMES);
    lossy.forEach((row, f) => expect(Math.abs(Number(row[2]) - Number(folder[f][2]))).toBeLessThanOrEqual(3));
  }, 180_000);

  it('--start/--end/--every choose frames by time; --fps overrides the video\'s timestamps; --workers 2 gives the same numbers', () => {
    const picked = lamella('series', 'run8.mkv', ...base, '--start', '0.5', '--end', '1.5', '--every', '2', '--out', 'picked');
    expect(picked.status, picked.stderr).toBe(0);
    expect(csvRows('picked').map((row) => row[0])).toEqual(['run8.mkv#2', 'run8.mkv#4', 'run8.mkv#6']);
    const slow = lamella('series', 'run8.mkv', ...base, '--fps', '100', '--workers', '2', '--chunk-frames', '3', '--out', 'fast');
    expect(slow.status, slow.stderr).toBe(0);
    expect(csvRows('fast').map((row) => Number(row[1]))).toEqual(Array.from({ length: FRAMES }, (_, f) => f * 0.01));
    const one = lamella('series', 'run8.mkv', ...base, '--fps', '100', '--workers', '1', '--chunk-frames', '3', '--out', 'fast1');
    expect(one.status, one.stderr).toBe(0);
    expect(csvRows('fast').map((row) => row.slice(2))).toEqual(csvRows('fast1').map((row) => row.slice(2)));
  }, 180_000);

  it('resumes by frame index: a rerun maps nothing; frames removed are mapped again, to the same numbers', () => {
    const before = csvRows('video8');
    const again = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), 'series', 'run8.mkv', '--stack', 'soap-film', '--light', 'D65', '--no-report', '--out', 'video8'], { cwd: dir, encoding: 'utf8' });
    expect(again.status, again.stderr).toBe(0);
    expect(`${again.stdout}${again.stderr}`).toContain(`0 frame(s) mapped, ${FRAMES} already done, 0 failed`);
    for (const name of readdirSync(join(dir, 'video8', 'frames'))) if (/^run8-000[56]\./.test(name)) rmSync(join(dir, 'video8', 'frames', name));
    expect(lamella('series', 'run8.mkv', ...base, '--out', 'video8').status).toBe(0);
    expect(csvRows('video8')).toEqual(before);
  }, 180_000);

  it('bad input: a video with photos (exit 2), --start after --end (2), --every 0 (2), a stack without --fps (2), a file FFmpeg cannot read (3, one line), a truncated video (3, the frames before kept)', () => {
    const mixed = lamella('series', 'run8.mkv', 'png/frame-0.png', ...base, '--out', 'bad');
    expect(mixed.status).toBe(2);
    expect(mixed.stderr).toContain('run8.mkv is a video of 8 frames: map it on its own');
    const order = lamella('series', 'run8.mkv', ...base, '--start', '2', '--end', '1', '--out', 'bad');
    expect(order.status).toBe(2);
    expect(order.stderr).toContain('--start 2 is after --end 1');
    const every = lamella('series', 'run8.mkv', ...base, '--every', '0', '--out', 'bad');
    expect(every.status).toBe(2);
    expect(every.stderr).toContain('--every');
    const stack = lamella('series', 'stack.tif', ...base, '--out', 'bad');
    expect(stack.status).toBe(2);
    expect(stack.stderr).toContain('give --fps or --interval');
    const junk = lamella('series', 'junk.mp4', ...base, '--out', 'bad');
    expect(junk.status).toBe(3);
    expect(junk.stderr.trim().split('\n')).toHaveLength(1);
    expect(junk.stderr).toContain('junk.mp4: FFmpeg cannot read it as a video');
    const cut = lamella('series', 'cut.mkv', ...base, '--out', 'cut');
    expect(cut.status).toBe(3);
    expect(cut.stderr).toMatch(/cut\.mkv: the video is truncated or damaged/);
    const kept = csvRows('cut');
    expect(kept.length).toBeGreaterThanOrEqual(1);
    expect(kept.length).toBeLessThan(FRAMES);
    const lossless = csvRows('video8');
    kept.forEach((row, f) => expect(row.slice(1)).toEqual(lossless[f].slice(1)));
  }, 180_000);
});
