/**
 * Reads every frame's header (size, EXIF capture time) without decoding pixels, and picks the
 * series' reference size: the size most frames share (ties: the earliest frame's). Unreadable
 * frames and frames of another size are rejected with one-line messages naming the frame.
 */
import { readPhotoMetadata } from '../io/readPhotoMetadata.js';
import type { FrameJob } from './types.js';

export interface FrameHeader {
  readonly width: number;
  readonly height: number;
  /** EXIF capture time in ms (DateTimeOriginal + SubSecTimeOriginal), or null. */
  readonly exifTimeMs: number | null;
  /** Why the EXIF capture time was not usable (impossible fields), if so. */
  readonly exifProblem?: string;
}

export type ReadFrameHeader = (path: string) => Promise<FrameHeader>;

export async function readFrameHeader(path: string): Promise<FrameHeader> {
  const meta = await readPhotoMetadata(path);
  const s = meta.exif.timestampS;
  return {
    width: meta.width,
    height: meta.height,
    exifTimeMs: typeof s === 'number' && Number.isFinite(s) ? Math.round(s * 1e6) / 1e3 : null,
    ...(meta.exif.problem ? { exifProblem: meta.exif.problem } : {}),
  };
}

export interface ProbedFrames {
  /** Frames with a readable header, in input order, with their headers. */
  readonly readable: Array<{ frame: FrameJob; header: FrameHeader }>;
  readonly size: { width: number; height: number } | null;
  /** Frames rejected for another size (kept in timing, not mapped). */
  readonly wrongSize: Set<number>;
  readonly messages: string[];
}

export async function probeFrames(frames: readonly FrameJob[], read: ReadFrameHeader = readFrameHeader): Promise<ProbedFrames> {
  const readable: ProbedFrames['readable'] = [];
  const messages: string[] = [];
  for (const frame of frames) {
    try {
      readable.push({ frame, header: await read(frame.path) });
    } catch (error) {
      const text = error instanceof Error ? error.message : String(error);
      messages.push(text.includes(frame.path) || text.includes(frame.name) ? text : `${frame.name}: ${text}`);
    }
  }
  const counts = new Map<string, number>();
  for (const { header } of readable) counts.set(`${header.width}x${header.height}`, (counts.get(`${header.width}x${header.height}`) ?? 0) + 1);
  let best: string | null = null;
  for (const [key, count] of counts) if (best === null || count > counts.get(best)!) best = key;
  const size = best === null ? null : { width: Number(best.split('x')[0]), height: Number(best.split('x')[1]) };
  const wrongSize = new Set<number>();
  for (const { frame, header } of readable) {
    if (size && (header.width !== size.width || header.height !== size.height)) {
      wrongSize.add(frame.index);
      messages.push(`${frame.name}: size ${header.width}x${header.height} differs from the series' ${size.width}x${size.height}; skipped`);
    }
  }
  return { readable, size, wrongSize, messages };
}
