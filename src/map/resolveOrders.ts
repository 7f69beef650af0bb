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
  const resolver = new OrderResolver(field, options);
  resolver.grow();
  resolver.choosePatchVariants();
  return { position: resolver.value, chosen: resolver.chosen, patch: resolver.patch, patchCount: resolver.patchCount };
}

/**
 * The state of one resolution and its steps. A class rather than functions nested in
 * `resolveOrders`: nested functions are new closures on every call, and V8 optimised each anew
 * for every frame of a series (and kept deoptimising one whose feedback was incomplete); a
 * class's methods are compiled once per process.
 */
class OrderResolver {
  readonly width: number;
  readonly cells: number;
  readonly perCell: number;
  readonly count: Uint8Array;
  readonly position: Float32Array;
  readonly cost: Float32Array;
  readonly chosen: Uint8Array;
  readonly patch: Int32Array;
  readonly parent: Int32Array;
  readonly quality: Float32Array;
  readonly order: Int32Array;
  readonly value: Float32Array;
  readonly patchStart: number[] = [];
  readonly heap = new MaxHeap(4096);
  ordered = 0;
  patchCount = 0;
  // The options read in the loops, read once.
  readonly maxJump: number;
  readonly boundaryWeight: number;
  readonly noiseCost: number;
  readonly dark: Uint8Array | null;
  readonly darkPosition: number;
  readonly prior: Float32Array | null;
  readonly priorWeight: number;
  readonly anchors: ReadonlyArray<{ readonly cell: number; readonly position: number }>;

  constructor(field: CandidateField, options: OrderOptions) {
    this.width = field.width;
    this.cells = field.width * field.height;
    this.perCell = field.perCell;
    this.count = field.count;
    this.position = field.position;
    this.cost = field.cost;
    this.chosen = new Uint8Array(this.cells).fill(NONE);
    this.patch = new Int32Array(this.cells).fill(-1);
    this.parent = new Int32Array(this.cells).fill(-1);
    this.quality = cellQuality(field, options.noiseCost);
    this.order = new Int32Array(this.cells);
    this.value = new Float32Array(this.cells).fill(NaN);
    this.maxJump = options.maxJump;
    this.boundaryWeight = options.boundaryWeight;
    this.noiseCost = options.noiseCost;
    this.dark = options.dark ?? null;
    this.darkPosition = options.darkPosition ?? 0;
    this.prior = options.prior ?? null;
    this.priorWeight = options.priorWeight ?? 0;
    this.anchors = options.anchors ?? [];
  }

  /** Step 1: patches grown best first from seeds taken best first. */
  grow(): void {
    const { cells, count, chosen, patch, order, value, position, perCell } = this;
    // Seeds best first.
    const seedOrder = sortByQualityDescending(this.quality);
    for (let s = 0; s < cells; s++) {
      const seed = seedOrder[s];
      if (chosen[seed] !== NONE || count[seed] === 0) continue;
      const id = this.patchCount++;
      this.patchStart.push(this.ordered);
      chosen[seed] = 0;
      value[seed] = position[seed * perCell];
      patch[seed] = id;
      order[this.ordered++] = seed;
      this.pushNeighbours(seed);
      this.growPatch(id);
    }
    this.patchStart.push(this.ordered);
  }

  /** Grows patch `id` from the cells on the heap until no candidate continues it. */
  growPatch(id: number): void {
    const { heap, chosen, count, cost, position, perCell, patch, parent, order, value, maxJump, noiseCost } = this;
    while (heap.size > 0) {
      const item = heap.pop();
      const j = item >> 2;
      const from = this.neighbourOf(j, item & 3);
      if (chosen[j] !== NONE || from < 0) continue;
      const reference = this.extrapolate(from, j);
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
      order[this.ordered++] = j;
      this.pushNeighbours(j);
    }
  }

  pushNeighbours(i: number): void {
    const { width, cells } = this;
    const x = i % width;
    // Direction code d: the popped item's `from` is the neighbour of j in direction d.
    if (x + 1 < width) this.pushIfOpen(i + 1, 0);
    if (x > 0) this.pushIfOpen(i - 1, 1);
    if (i + width < cells) this.pushIfOpen(i + width, 2);
    if (i - width >= 0) this.pushIfOpen(i - width, 3);
  }

  pushIfOpen(j: number, direction: number): void {
    if (this.chosen[j] !== NONE || this.count[j] === 0) return;
    this.heap.push((j << 2) | direction, this.quality[j]);
  }

  /** The labelled cell that pushed j: direction 0 means j = from + 1, etc. */
  neighbourOf(j: number, direction: number): number {
    switch (direction) {
      case 0:
        return j - 1;
      case 1:
        return j + 1;
      case 2:
        return j - this.width;
      default:
        return j + this.width;
    }
  }

  /** Reference for j from its labelled neighbour `from`, continuing the local slope. */
  extrapolate(from: number, j: number): number {
    const { cells, patch, value, width } = this;
    const beyond = 2 * from - j;
    const vFrom = value[from];
    if (beyond < 0 || beyond >= cells || patch[beyond] !== patch[from]) return vFrom;
    // Reject wrap-around across rows for horizontal steps.
    if (Math.abs(j - from) === 1 && Math.floor(beyond / width) !== Math.floor(from / width)) return vFrom;
    let slope = vFrom - value[beyond];
    const limit = this.maxJump * 0.5;
    if (slope > limit) slope = limit;
    else if (slope < -limit) slope = -limit;
    return vFrom + slope;
  }

  /** Step 2: each patch (largest first) takes the variant of lowest total cost. */
  choosePatchVariants(): void {
    const { patchStart, patchCount, cells, order, count, value, chosen } = this;
    const sizes = patchStart.slice(0, -1).map((start, id) => ({ id, size: patchStart[id + 1] - start }));
    sizes.sort((a, b) => b.size - a.size);
    const decided = new Uint8Array(patchCount);
    const trial = new Float32Array(cells);
    const trialChosen = new Uint8Array(cells);
    const anchorsByPatch = new Map<number, Array<{ cell: number; position: number }>>();
    for (const anchor of this.anchors) {
      const id = this.patch[anchor.cell];
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
      const anchors = anchorsByPatch.get(id) ?? null;
      for (let k = 0; k < count[seed]; k++) {
        const total = this.evaluateVariant(id, start, end, k, trial, trialChosen, decided, anchors, bestTotal);
        if (total < bestTotal) {
          bestTotal = total;
          bestVariant = k;
        }
      }
      if (bestVariant !== 0 || chosen[seed] !== 0) {
        this.evaluateVariant(id, start, end, bestVariant, trial, trialChosen, decided, anchors, Infinity);
        for (let o = start; o < end; o++) {
          const j = order[o];
          value[j] = trial[j];
          chosen[j] = trialChosen[j];
        }
      }
      decided[id] = 1;
    }
  }

  /**
   * Total cost of patch `id` re-propagated from its seed's candidate `seedK` (into `trial`,
   * `trialChosen`): colour costs, breaks inside it, then its boundary, prior and anchors.
   * `bound` is the total to beat: every term is ≥ 0, so once the running total reaches it the
   * variant has lost (Infinity).
   */
  evaluateVariant(
    id: number,
    start: number,
    end: number,
    seedK: number,
    trial: Float32Array,
    trialChosen: Uint8Array,
    decided: Uint8Array,
    anchors: Array<{ cell: number; position: number }> | null,
    bound: number,
  ): number {
    let total = this.propagateVariant(start, end, seedK, trial, trialChosen, bound);
    if (total === Infinity) return Infinity;
    total = this.boundaryAndPriorCost(id, start, end, trial, decided, total, bound);
    if (total === Infinity) return Infinity;
    if (anchors) for (const anchor of anchors) if (Math.abs(trial[anchor.cell] - anchor.position) > this.maxJump * 0.5) total += 1e12;
    return total;
  }

  /** The patch re-propagated in its growth order from candidate `seedK` of its seed: colour costs and breaks (Infinity once `bound` is reached). */
  propagateVariant(start: number, end: number, seedK: number, trial: Float32Array, trialChosen: Uint8Array, bound: number): number {
    const { order, perCell, parent, count, position, cost, maxJump, boundaryWeight } = this;
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
    return total;
  }

  /** The boundary terms (decided patches, too-dark cells) and the prior of a variant, added to `total`; Infinity once `bound` is reached. */
  boundaryAndPriorCost(id: number, start: number, end: number, trial: Float32Array, decided: Uint8Array, total: number, bound: number): number {
    const { order, width, cells, patch, value, dark, darkPosition, prior, priorWeight, maxJump, boundaryWeight } = this;
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
