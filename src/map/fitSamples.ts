/**
 * The pixels the photo-formation fit learns from: film pixels (status ok) on a regular stride,
 * balanced over colours, so that a large uniform surface (a dark cloth, a chuck, a bench, one
 * flat coating colour) cannot outvote the many colours of the film. Candidates are taken on a
 * stride (up to 8× the target), binned on a 16-level cube of encoded colour, and each bin keeps
 * at most an equal share of the target (water-filling: bins with fewer candidates keep all).
 * On a photo of one colour the result is the plain stride sample.
 */
import { PixelStatus } from './types.js';

const BINS = 16;
const OVERSAMPLE = 8;

/** Up to about `target` film pixels as n × 3 encoded colours; `balanced` false: the plain stride sample. */
export function sampleFitPixels(rgb: Float32Array, status: Uint8Array, pixels: number, target: number, balanced = true): Float32Array {
  let eligible = 0;
  for (let i = 0; i < pixels; i++) if (status[i] === PixelStatus.ok) eligible++;
  const stride = Math.max(1, Math.floor(eligible / (balanced ? target * OVERSAMPLE : target)));
  const candidates = new Int32Array(Math.ceil(eligible / stride));
  const binOf = new Uint16Array(candidates.length);
  const counts = new Uint32Array(BINS * BINS * BINS);
  let seen = 0;
  let n = 0;
  for (let i = 0; i < pixels; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    if (seen++ % stride !== 0) continue;
    const bin = (quantise(rgb[i * 3]) * BINS + quantise(rgb[i * 3 + 1])) * BINS + quantise(rgb[i * 3 + 2]);
    candidates[n] = i;
    binOf[n] = bin;
    counts[bin]++;
    n++;
  }
  const cap = balanced ? waterLevel(counts, Math.min(target, n)) : n;
  const seenInBin = new Uint32Array(counts.length);
  const out = new Float32Array(n * 3);
  let m = 0;
  // Within a bin, keep an evenly spread kb of its candidates (kb = min(count, cap)): candidate j
  // is kept when ⌊(j+1)·kb/count⌋ steps up, so the kept ones stay spread over the photo.
  for (let k = 0; k < n; k++) {
    const bin = binOf[k];
    const total = counts[bin];
    const keep = total < cap ? total : cap;
    const j = seenInBin[bin]++;
    if (Math.floor(((j + 1) * keep) / total) === Math.floor((j * keep) / total)) continue;
    const i = candidates[k];
    out[m * 3] = rgb[i * 3];
    out[m * 3 + 1] = rgb[i * 3 + 1];
    out[m * 3 + 2] = rgb[i * 3 + 2];
    m++;
  }
  return out.subarray(0, m * 3);
}

function quantise(value: number): number {
  const q = Math.floor(value * BINS);
  return q < 0 ? 0 : q >= BINS ? BINS - 1 : q;
}

/** The largest per-bin cap whose total kept count stays within `target`. */
function waterLevel(counts: Uint32Array, target: number): number {
  let low = 1;
  let high = 1;
  for (let b = 0; b < counts.length; b++) if (counts[b] > high) high = counts[b];
  const kept = (cap: number): number => {
    let total = 0;
    for (let b = 0; b < counts.length; b++) total += counts[b] < cap ? counts[b] : cap;
    return total;
  };
  if (kept(high) <= target) return high;
  while (high - low > 1) {
    const mid = (low + high) >> 1;
    if (kept(mid) <= target) low = mid;
    else high = mid;
  }
  return Math.max(1, low);
}
