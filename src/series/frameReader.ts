/**
 * Decoded frames of a chunk that lives in one video file or image stack, in order and on demand:
 * a video's run of frames comes from one FFmpeg process (src/io/readVideo.ts), a stack's pages are
 * read one at a time. Frames that are files are not read here (the processor reads them).
 */
import { stat } from 'node:fs/promises';
import { readPhoto } from '../io/readPhoto.js';
import { MAP_MAX_PIXELS } from '../io/limits.js';
import { probeVideo, readVideoFrames, type VideoFrameResult, type VideoInfo } from '../io/readVideo.js';
import type { Photo } from '../io/photo.js';
import type { FrameJob } from './types.js';

const probes = new Map<string, Promise<VideoInfo>>();

/** The video's frame list, probed once per thread and file version. */
export async function videoInfoOf(path: string): Promise<VideoInfo> {
  const info = await stat(path);
  const key = `${path}\u0000${info.size}\u0000${info.mtimeMs}`;
  let probe = probes.get(key);
  if (!probe) {
    probe = probeVideo(path);
    probes.set(key, probe);
    probe.catch(() => probes.delete(key));
  }
  return probe;
}

export interface FrameReader {
  /** The frame's photo (frames must be asked for in the chunk's order; skipped ones are passed over). */
  photoOf(frame: FrameJob): Promise<Photo>;
  close(): Promise<void>;
}

export function frameReader(chunk: readonly FrameJob[]): FrameReader {
  let video: AsyncGenerator<VideoFrameResult> | null = null;
  return {
    async photoOf(frame: FrameJob): Promise<Photo> {
      const container = frame.container;
      if (!container) return readPhoto(frame.path, { maxPixels: MAP_MAX_PIXELS });
      if (container.kind === 'stack') return readPhoto(frame.path, { maxPixels: MAP_MAX_PIXELS, page: container.index });
      if (!video) {
        const info = await videoInfoOf(frame.path);
        const indices = chunk.filter((f) => f.container && f.container.index >= container.index).map((f) => f.container!.index);
        video = readVideoFrames(frame.path, info, indices);
      }
      for (;;) {
        const next = await video.next();
        if (next.done) throw new Error('the decoder delivered no more frames');
        const result = next.value;
        if (result.index < container.index) continue;
        if (result.index > container.index) throw new Error(`frame ${container.index} was not delivered by the decoder`);
        if ('error' in result) throw result.error;
        return result.photo;
      }
    },
    async close(): Promise<void> {
      if (video) await video.return(undefined);
    },
  };
}
