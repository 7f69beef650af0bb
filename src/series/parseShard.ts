/**
 * Parses a shard spec `K/N` (1-based: the K-th of N contiguous parts of the series).
 */
export interface Shard {
  readonly index: number;
  readonly count: number;
}

export function parseShard(spec: string): Shard {
  const match = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(String(spec));
  if (!match) throw new RangeError(`shard must be K/N with whole numbers 1 <= K <= N, received "${spec}"`);
  const index = Number(match[1]);
  const count = Number(match[2]);
  if (count < 1 || index < 1 || index > count) {
    throw new RangeError(`shard must be K/N with whole numbers 1 <= K <= N, received "${spec}"`);
  }
  return { index, count };
}
