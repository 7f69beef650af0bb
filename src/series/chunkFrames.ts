/**
 * Cuts the ordered frame list into chunks and picks a shard's part of them.
 *
 * Chunk boundaries depend only on the frame list and `chunkFrames` (every chunkFrames-th frame
 * starts a chunk), never on the number of workers or shards. Within a chunk each frame takes the
 * previous frame's map as its prior; the first frame of a chunk is mapped without a prior. So one
 * run, several workers, or N shards on N machines map every frame identically.
 * A shard K/N takes the K-th of N contiguous runs of whole chunks, as even in chunk count as possible.
 */
import type { FrameJob } from './types.js';
import type { Shard } from './parseShard.js';

export function chunkFrames<T>(frames: readonly T[], chunkFrames: number): T[][] {
  if (!Number.isInteger(chunkFrames) || chunkFrames < 1) throw new RangeError(`chunkFrames must be a whole number >= 1, received ${chunkFrames}`);
  const chunks: T[][] = [];
  for (let start = 0; start < frames.length; start += chunkFrames) chunks.push(frames.slice(start, start + chunkFrames));
  return chunks;
}

/** The chunks belonging to shard K of N (1-based), contiguous; may be empty when N exceeds the chunks. */
export function shardChunks(chunks: readonly FrameJob[][], shard: Shard): FrameJob[][] {
  const { index, count } = shard;
  if (!Number.isInteger(count) || count < 1 || !Number.isInteger(index) || index < 1 || index > count) {
    throw new RangeError(`shard must satisfy 1 <= index <= count, received ${index}/${count}`);
  }
  const first = Math.floor(((index - 1) * chunks.length) / count);
  const end = Math.floor((index * chunks.length) / count);
  return chunks.slice(first, end);
}
