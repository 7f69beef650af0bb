/**
 * The pixels the photo-formation fit learns from: film pixels (status ok) on a regular stride,
 * balanced over colours, so that a large uniform surface (a dark cloth, a chuck, a bench, one
 * flat coating colour) cannot outvote the many colours of the film. Candidates are taken on a
 * stride (up to 8× the target), binned on a 16-level cube of encoded colour, and each bin keeps
 * at most an equal share of the target (water-filling: bins with fewer candidates keep all).
 * On a photo of one colour the result is the plain stride sample.
 */
import { PixelStatus } from './types.js';
import { type PhotoPixels, valueAt } from './photoPixels.js';

const BINS = 16;
const OVERSAMPLE = 8;
/** Largest share of the sample one colour bin may hold. */
const MAX_BIN_SHARE = 0.15;

/** Up to about `target` film pixels as n × 3 encoded colours; `balanced` false: the plain stride sample. */
export function sampleFitPixels(rgb: PhotoPixels, status: Uint8Array, pixels: number, target: number, balanced = true): Float32Array {
  let eligible = 0;
  for (let i = 0; i < pixels; i++) if (status[i] === PixelStatus.ok) eligible++;
  const stride = Math.max(1, Math.floor(eligible / (balanced ? target * OVERSAMPLE : target)));
  const candidates = new Int32Array(Math.ceil(eligible / stride));
  const binOf = new Uint16Array(candidates.length);
  const counts = new Uint32Array(BINS * BINS * BINS);
  // Every stride-th eligible pixel, from the first: a countdown, not a division per pixel.
  let skip = 0;
  let n = 0;
  for (let i = 0; i < pixels; i++) {
    if (status[i] !== PixelStatus.ok) continue;
    if (skip > 0) {
      skip--;
      continue;
    }
    skip = stride - 1;
    const bin = (quantise(valueAt(rgb, i * 3)) * BINS + quantise(valueAt(rgb, i * 3 + 1))) * BINS + quantise(valueAt(rgb, i * 3 + 2));
    candidates[n] = i;
    binOf[n] = bin;
    counts[bin]++;
    n++;
  }
  // Each colour bin keeps at most MAX_BIN_SHARE of the candidates (a uniform surface is capped);
  // the other bins keep theirs in proportion, so rare colour mixtures do not gain weight.
  const cap = balanced ? Math.max(1, Math.ceil(MAX_BIN_SHARE * n)) : n;
  let keptTotal = 0;
  for (let bin = 0; bin < counts.length; bin++) keptTotal += counts[bin] < cap ? counts[bin] : cap;
  const seenInBin = new Uint32Array(counts.length);
  const every = Math.max(1, keptTotal / Math.max(1, target));
  const out = new Float32Array(Math.min(n, target + 1) * 3);
  let m = 0;
  let kept = 0;
  // Within a bin, keep an evenly spread kb of its candidates (kb = min(count, cap)): candidate j
  // is kept when ⌊(j+1)·kb/count⌋ steps up; of the kept ones, every `every`-th is taken.
  for (let k = 0; k < n; k++) {
    const bin = binOf[k];
    const total = counts[bin];
    const keep = total < cap ? total : cap;
    const j = seenInBin[bin]++;
    if (Math.floor(((j + 1) * keep) / total) === Math.floor((j * keep) / total)) continue;
    if (Math.floor((kept + 1) / every) === Math.floor(kept / every)) {
      kept++;
      continue;
    }
    kept++;
    if (m * 3 >= out.length) break;
    const i = candidates[k];
    out[m * 3] = valueAt(rgb, i * 3);
    out[m * 3 + 1] = valueAt(rgb, i * 3 + 1);
    out[m * 3 + 2] = valueAt(rgb, i * 3 + 2);
    m++;
  }
  return out.subarray(0, m * 3);
}

function quantise(value: number): number {
  const q = Math.floor(value * BINS);
  return q < 0 ? 0 : q >= BINS ? BINS - 1 : q;
}
