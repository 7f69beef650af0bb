/**
 * Reproducible Gaussian noise: the Mulberry32 32-bit generator (a public-domain mixing function,
 * common practice for seeded simulation) feeding the Box–Muller transform
 * (G. E. P. Box, M. E. Muller, Ann. Math. Stat. 29, 610 (1958)). Not cryptographic.
 */

export function createUniform(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates (mean 0, sd 1) from a seed; two per Box–Muller step, cached. */
export function createNormal(seed: number): () => number {
  const uniform = createUniform(seed);
  let spare = 0;
  let hasSpare = false;
  return () => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    let u = 0;
    while (u === 0) u = uniform();
    const v = uniform();
    const radius = Math.sqrt(-2 * Math.log(u));
    spare = radius * Math.sin(2 * Math.PI * v);
    hasSpare = true;
    return radius * Math.cos(2 * Math.PI * v);
  };
}
