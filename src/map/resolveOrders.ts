/**
 * Interference-order resolution over a grid of candidate thicknesses.
 *
 * The same colour recurs at several thicknesses, so each cell has several candidates. The
 * thickness field is smooth almost everywhere, with real steps at patterned edges, so:
 *
 * 1. Quality-guided growth (as in quality-guided phase unwrapping, Ghiglia & Pritt 1998, ch. 4):
 *    cells are visited best first (quality = cost margin between the best and second-best
 *    candidate); each newly reached cell takes the candidate that continues its labelled
 *    neighbour (with the local slope), provided the jump stays below `maxJump`. Where no
 *    candidate continues the field, growth stops and a new patch is seeded later from the best
 *    remaining cell, so slips between patches fall where the evidence is weakest.
 * 2. Continuity fixes only relative orders: a patch shifted by a whole order is just as smooth.
 *    For every patch (largest first) each alternative is re-propagated from each candidate of its
 *    seed, and the variant with the lowest total cost wins: colour cost (orders differ in
 *    saturation and brightness) + mismatches across the boundary with patches already decided and
 *    with too-dark cells + the prior (the previous frame of a series) + user anchors.
 */
import type { CandidateField } from './candidateField.js';
import { MaxHeap } from './maxHeap.js';

export interface OrderOptions {
  /** Largest thickness change between neighbouring cells, in table-position units. */
  readonly maxJump: number;
  /** Typical colour cost of a correct match (encoded units²), used to scale the quality. */
  readonly noiseCost: number;
  /** Cost charged per boundary edge whose two sides do not join continuously. */
  readonly boundaryWeight: number;
  /** Optional prior position per cell (NaN = none) and the weight per cell of disagreeing. */
  readonly prior?: Float32Array | null;
  readonly priorWeight?: number;
  /** Cells known to be too dark to measure (thin film), and the position they stand for. */
  readonly dark?: Uint8Array | null;
  readonly darkPosition?: number;
  /** User anchors: cell index and table position. */
  readonly anchors?: ReadonlyArray<{ readonly cell: number; readonly position: number }>;
}

export interface OrderResult {
  /** Chosen table position per cell; NaN where unresolved. */
  readonly position: Float32Array;
  /** Index of the chosen candidate per cell (255 = none). */
  readonly chosen: Uint8Array;
  /** Patch id per cell (-1 = none). */
  readonly patch: Int32Array;
  readonly patchCount: number;
}

const NONE = 255;

export function resolveOrders(field: CandidateField, options: OrderOptions): OrderResult {
  const { width, height, perCell, count, position, cost } = field;
  const cells = width * height;
  const chosen = new Uint8Array(cells).fill(NONE);
  const patch = new Int32Array(cells).fill(-1);
  const parent = new Int32Array(cells).fill(-1);
  const quality = cellQuality(field, options.noiseCost);
  const order = new Int32Array(cells);
  let ordered = 0;
  const seeds: number[] = [];
  const patchStart: number[] = [];

  // Seeds best first.
  const seedOrder = sortByQualityDescending(quality);

  // The options read in the loops below, read once.
  const { maxJump, boundaryWeight, noiseCost } = options;
  const dark = options.dark ?? null;
  const darkPosition = options.darkPosition ?? 0;
  const prior = options.prior ?? null;
  const priorWeight = options.priorWeight ?? 0;
  const heap = new MaxHeap(4096);
  const value = new Float32Array(cells).fill(NaN);
  let patchCount = 0;
  for (let s = 0; s < cells; s++) {
    const seed = seedOrder[s];
    if (chosen[seed] !== NONE || count[seed] === 0) continue;
    const id = patchCount++;
    seeds.push(seed);
    patchStart.push(ordered);
    chosen[seed] = 0;
    value[seed] = position[seed * perCell];
    patch[seed] = id;
    order[ordered++] = seed;
    pushNeighbours(seed);
    while (heap.size > 0) {
      const item = heap.pop();
      const j = item >> 2;
      const from = neighbourOf(j, item & 3);
      if (chosen[j] !== NONE || from < 0) continue;
      const reference = extrapolate(from, j);
      let bestK = -1;
      let bestGap = maxJump;
      const base = j * perCell;
      // Only candidates that fit the colour nearly as well as the best may continue the field:
      // at a real step the other side's wrong-order candidates are poor colour matches.
      const costLimit = Math.max(4 * cost[base], cost[base] + 8 * noiseCost);
      for (let k = 0; k < count[j]; k++) {
        if (cost[base + k] > costLimit) continue;
        const gap = Math.abs(position[base + k] - reference);
        if (gap <= bestGap) {
          bestGap = gap;
          bestK = k;
        }
      }
      if (bestK < 0) continue;
      chosen[j] = bestK;
      value[j] = position[base + bestK];
      patch[j] = id;
      parent[j] = from;
      order[ordered++] = j;
      pushNeighbours(j);
    }
  }
  patchStart.push(ordered);

  choosePatchVariants();
  return { position: value, chosen, patch, patchCount };

  function pushNeighbours(i: number): void {
    const x = i % width;
    // Direction code d: the popped item's `from` is the neighbour of j in direction d.
    if (x + 1 < width) pushIfOpen(i + 1, 0);
    if (x > 0) pushIfOpen(i - 1, 1);
    if (i + width < cells) pushIfOpen(i + width, 2);
    if (i - width >= 0) pushIfOpen(i - width, 3);
  }

  function pushIfOpen(j: number, direction: number): void {
    if (chosen[j] !== NONE || count[j] === 0) return;
    heap.push((j << 2) | direction, quality[j]);
  }

  /** The labelled cell that pushed j: direction 0 means j = from + 1, etc. */
  function neighbourOf(j: number, direction: number): number {
    switch (direction) {
      case 0:
        return j - 1;
      case 1:
        return j + 1;
      case 2:
        return j - width;
      default:
        return j + width;
    }
  }

  /** Reference for j from its labelled neighbour `from`, continuing the local slope. */
  function extrapolate(from: number, j: number): number {
    const beyond = 2 * from - j;
    const vFrom = value[from];
    if (beyond < 0 || beyond >= cells || patch[beyond] !== patch[from]) return vFrom;
    // Reject wrap-around across rows for horizontal steps.
    if (Math.abs(j - from) === 1 && Math.floor(beyond / width) !== Math.floor(from / width)) return vFrom;
    let slope = vFrom - value[beyond];
    const limit = maxJump * 0.5;
    if (slope > limit) slope = limit;
    else if (slope < -limit) slope = -limit;
    return vFrom + slope;
  }

  function choosePatchVariants(): void {
    const sizes = patchStart.slice(0, -1).map((start, id) => ({ id, size: patchStart[id + 1] - start }));
    sizes.sort((a, b) => b.size - a.size);
    const decided = new Uint8Array(patchCount);
    const trial = new Float32Array(cells);
    const trialChosen = new Uint8Array(cells);
    const anchorsByPatch = new Map<number, Array<{ cell: number; position: number }>>();
    for (const anchor of options.anchors ?? []) {
      const id = patch[anchor.cell];
      if (id < 0) continue;
      const list = anchorsByPatch.get(id) ?? [];
      list.push(anchor);
      anchorsByPatch.set(id, list);
    }
    for (const { id } of sizes) {
      const start = patchStart[id];
      const end = patchStart[id + 1];
      const seed = order[start];
      let bestTotal = Infinity;
      let bestVariant = 0;
      for (let k = 0; k < count[seed]; k++) {
        const total = evaluateVariant(id, start, end, k, trial, trialChosen, decided, anchorsByPatch.get(id), bestTotal);
        if (total < bestTotal) {
          bestTotal = total;
          bestVariant = k;
        }
      }
      if (bestVariant !== 0 || chosen[seed] !== 0) {
        evaluateVariant(id, start, end, bestVariant, trial, trialChosen, decided, anchorsByPatch.get(id), Infinity);
        for (let o = start; o < end; o++) {
          const j = order[o];
          value[j] = trial[j];
          chosen[j] = trialChosen[j];
        }
      }
      decided[id] = 1;
    }
  }

  function evaluateVariant(
    id: number,
    start: number,
    end: number,
    seedK: number,
    trial: Float32Array,
    trialChosen: Uint8Array,
    decided: Uint8Array,
    anchors: Array<{ cell: number; position: number }> | undefined,
    /** Total to beat: every term is ≥ 0, so once the running total reaches it the variant has lost. */
    bound: number,
  ): number {
    let total = 0;
    for (let o = start; o < end; o++) {
      const j = order[o];
      const base = j * perCell;
      let k: number;
      if (o === start) k = seedK;
      else {
        const reference = trial[parent[j]];
        k = 0;
        let bestGap = Infinity;
        for (let q = 0; q < count[j]; q++) {
          const gap = Math.abs(position[base + q] - reference);
          if (gap < bestGap) {
            bestGap = gap;
            k = q;
          }
        }
        if (bestGap > maxJump) total += boundaryWeight;
      }
      trial[j] = position[base + k];
      trialChosen[j] = k;
      total += cost[base + k];
      if (total >= bound) return Infinity;
    }
    // (The rest is its own function: most calls return above, and a function optimised on those
    // calls alone had no type feedback for what follows, so every call reaching it fell back to
    // the interpreter: thousands of times per frame.)
    total = boundaryAndPriorCost(id, start, end, trial, decided, total, bound);
    if (total === Infinity) return Infinity;
    if (anchors) for (const anchor of anchors) if (Math.abs(trial[anchor.cell] - anchor.position) > maxJump * 0.5) total += 1e12;
    return total;
  }

  /** evaluateVariant's boundary terms (decided patches, too-dark cells) and prior, added to `total`; Infinity once `bound` is reached. */
  function boundaryAndPriorCost(id: number, start: number, end: number, trial: Float32Array, decided: Uint8Array, total: number, bound: number): number {
    for (let o = start; o < end; o++) {
      const j = order[o];
      const v = trial[j];
      const x = j % width;
      for (let d = 0; d < 4; d++) {
        const n = d === 0 ? (x + 1 < width ? j + 1 : -1) : d === 1 ? (x > 0 ? j - 1 : -1) : d === 2 ? j + width : j - width;
        if (n < 0 || n >= cells) continue;
        const other = patch[n];
        if (other >= 0 && other !== id && decided[other]) {
          if (Math.abs(value[n] - v) > maxJump) total += boundaryWeight;
        } else if (dark && dark[n]) {
          if (v - darkPosition > maxJump) total += 0.5 * boundaryWeight;
        }
      }
      if (prior && priorWeight > 0) {
        const p = prior[j];
        if (p === p) total += priorWeight * Math.min(1, Math.abs(v - p) / maxJump);
      }
      if (total >= bound) return Infinity;
    }
    return total;
  }
}

/** Quality of a cell: how much better its best candidate is than the runner-up, and how good. */
function cellQuality(field: CandidateField, noiseCost: number): Float32Array {
  const { perCell, count, cost } = field;
  const cells = count.length;
  const quality = new Float32Array(cells);
  const floor = Math.max(noiseCost, 1e-9);
  for (let i = 0; i < cells; i++) {
    const n = count[i];
    if (n === 0) {
      quality[i] = -1;
      continue;
    }
    const best = cost[i * perCell];
    const second = n > 1 ? cost[i * perCell + 1] : best + 100 * floor;
    quality[i] = Math.min(50, (second - best) / floor) / (1 + best / floor);
  }
  return quality;
}

/**
 * Cell indices by descending quality, by counting sort on 4,096 quality bins (seeds only need
 * an approximate best-first order; O(n) instead of a comparison sort).
 */
function sortByQualityDescending(quality: Float32Array): Int32Array {
  const bins = 4096;
  let max = 0;
  for (let i = 0; i < quality.length; i++) if (quality[i] > max) max = quality[i];
  const scale = max > 0 ? (bins - 1) / max : 0;
  const binOf = (q: number): number => (q <= 0 ? bins - 1 : bins - 1 - Math.floor(q * scale));
  const start = new Int32Array(bins + 1);
  for (let i = 0; i < quality.length; i++) start[binOf(quality[i]) + 1]++;
  for (let b = 0; b < bins; b++) start[b + 1] += start[b];
  const order = new Int32Array(quality.length);
  for (let i = 0; i < quality.length; i++) order[start[binOf(quality[i])]++] = i;
  return order;
}
