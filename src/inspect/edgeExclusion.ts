/**
 * Edge exclusion: the film pixels farther than a band from the film area's outline. The distance
 * is the exact Euclidean distance between pixel centres to the nearest pixel that is not film
 * (Felzenszwalb & Huttenlocher 2012, "Distance transforms of sampled functions", the 1-D lower
 * envelope of parabolas applied by columns, then rows). The photo's border is not an outline:
 * film running off the photo keeps its pixels there.
 */
import { isFilmStatus } from '../map/mapImages.js';

/**
 * 1 where the pixel is film and its distance to the nearest non-film pixel is more than `bandPx`
 * (a band of 0 keeps the whole film area).
 */
export function insideEdgeBand(status: Uint8Array, width: number, height: number, bandPx: number): Uint8Array {
  const keep = new Uint8Array(width * height);
  if (bandPx <= 0) {
    for (let i = 0; i < keep.length; i++) keep[i] = isFilmStatus(status[i]) ? 1 : 0;
    return keep;
  }
  const d2 = squaredDistanceToNonFilm(status, width, height);
  const limit = bandPx * bandPx;
  for (let i = 0; i < keep.length; i++) keep[i] = isFilmStatus(status[i]) && d2[i] > limit ? 1 : 0;
  return keep;
}

const FAR = 1e20;

/** Squared distance (px²) of every pixel to the nearest non-film pixel (FAR when there is none). */
export function squaredDistanceToNonFilm(status: Uint8Array, width: number, height: number): Float64Array {
  const d = new Float64Array(width * height);
  for (let i = 0; i < d.length; i++) d[i] = isFilmStatus(status[i]) ? FAR : 0;
  const n = Math.max(width, height);
  const f = new Float64Array(n);
  const out = new Float64Array(n);
  const v = new Int32Array(n);
  const z = new Float64Array(n + 1);
  for (let x = 0; x < width; x++) {
    for (let y = 0; y < height; y++) f[y] = d[y * width + x];
    transform1d(f, height, out, v, z);
    for (let y = 0; y < height; y++) d[y * width + x] = out[y];
  }
  for (let y = 0; y < height; y++) {
    const row = y * width;
    for (let x = 0; x < width; x++) f[x] = d[row + x];
    transform1d(f, width, out, v, z);
    for (let x = 0; x < width; x++) d[row + x] = out[x];
  }
  return d;
}

/** The 1-D squared distance transform of f[0..n) into out (lower envelope of parabolas). */
function transform1d(f: Float64Array, n: number, out: Float64Array, v: Int32Array, z: Float64Array): void {
  let k = 0;
  v[0] = 0;
  z[0] = -Infinity;
  z[1] = Infinity;
  for (let q = 1; q < n; q++) {
    let s = (f[q] + q * q - (f[v[k]] + v[k] * v[k])) / (2 * q - 2 * v[k]);
    while (s <= z[k]) {
      k--;
      s = (f[q] + q * q - (f[v[k]] + v[k] * v[k])) / (2 * q - 2 * v[k]);
    }
    k++;
    v[k] = q;
    z[k] = s;
    z[k + 1] = Infinity;
  }
  k = 0;
  for (let q = 0; q < n; q++) {
    while (z[k + 1] < q) k++;
    out[q] = (q - v[k]) ** 2 + f[v[k]];
  }
}
