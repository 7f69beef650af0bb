/**
 * A series from one video file or one multi-page image stack instead of a folder of photos: the
 * file's frames become the series' frames, named `<file>#<index>` (index from 0) with per-frame
 * outputs `<file stem>-<index>` in `frames/`. A video's frame times come from its timestamps
 * (src/io/readVideo.ts), a stack has none (give --fps or --interval). A frame's identity for
 * resume is the file's size, modification time and the SHA-256 of its first MiB (hashing a video
 * of gigabytes whole on every run would cost more than it protects), plus the frame's index.
 */
import { createHash } from 'node:crypto';
import { open, stat } from 'node:fs/promises';
import { basename, extname } from 'node:path';
import { readPhotoMetadata } from '../io/readPhotoMetadata.js';
import type { PhotoMetadata } from '../io/photo.js';
import { VIDEO_EXTENSIONS } from '../io/readVideo.js';
import { videoInfoOf } from './frameReader.js';
import type { FrameJob, FrameSource } from './types.js';

export interface ContainerInput {
  readonly kind: 'video' | 'stack';
  readonly path: string;
  readonly frameCount: number;
  readonly width: number;
  readonly height: number;
  /** Frame times from the file (seconds, the first frame at 0), or null (a stack). */
  readonly timesS: number[] | null;
  readonly bitDepth: 8 | 16;
  /** Why the file's frames end early (a truncated or damaged video), else null. */
  readonly damage: string | null;
}

export function isVideoFileName(name: string): boolean {
  return VIDEO_EXTENSIONS.includes(extname(name).toLowerCase());
}

/** The file as a video or a stack of more than one page, or null when it is a single photo. */
export async function containerOf(path: string): Promise<ContainerInput | null> {
  if (isVideoFileName(path)) {
    const info = await videoInfoOf(path);
    return {
      kind: 'video',
      path,
      frameCount: info.ptsS.length,
      width: info.width,
      height: info.height,
      timesS: info.ptsS.map((t) => t - info.ptsS[0]),
      bitDepth: info.bitDepth,
      damage: info.damage,
    };
  }
  if (!/\.tiff?$/i.test(path)) return null;
  let meta: PhotoMetadata;
  try {
    meta = await readPhotoMetadata(path);
  } catch {
    return null; // not readable as TIFF: the frame's own read will say why
  }
  if (meta.pages <= 1) return null;
  return { kind: 'stack', path, frameCount: meta.pages, width: meta.width, height: meta.pageHeight, timesS: null, bitDepth: meta.bitDepth, damage: null };
}

/** The container's frames as series frames (`index` = the frame's index in the file). */
export function containerFrameJobs(container: ContainerInput): FrameJob[] {
  const name = basename(container.path);
  const stem = name.slice(0, name.length - extname(name).length) || name;
  const digits = Math.max(4, String(container.frameCount - 1).length);
  return Array.from({ length: container.frameCount }, (_, index) => ({
    index,
    path: container.path,
    name: `${name}#${index}`,
    stem: `${stem}-${String(index).padStart(digits, '0')}`,
    container: { kind: container.kind, index },
  }));
}

const HEAD_BYTES = 1 << 20;

/** The container file's identity (size, modification time, SHA-256 of its head), or null when unreadable. */
export async function containerFingerprint(path: string): Promise<{ sizeBytes: number; mtimeMs: number; headSha256: string } | null> {
  try {
    const info = await stat(path);
    const handle = await open(path, 'r');
    try {
      const buffer = Buffer.alloc(Math.min(HEAD_BYTES, info.size));
      await handle.read(buffer, 0, buffer.length, 0);
      return { sizeBytes: info.size, mtimeMs: Math.round(info.mtimeMs), headSha256: createHash('sha256').update(buffer).digest('hex') };
    } finally {
      await handle.close();
    }
  } catch {
    return null;
  }
}

/** A container frame's fingerprint: the file's identity and the frame's index. */
export function containerFrameSource(file: { sizeBytes: number; mtimeMs: number; headSha256: string }, index: number): FrameSource {
  return {
    sizeBytes: file.sizeBytes,
    mtimeMs: file.mtimeMs,
    sha256: createHash('sha256').update(`${file.headSha256}:${file.sizeBytes}:${file.mtimeMs}#${index}`).digest('hex'),
  };
}
