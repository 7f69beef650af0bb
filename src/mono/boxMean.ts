/**
 * Mean of a field over a (2·radius + 1)² square, using only pixels where `film` is set
 * (separable running sums; common practice). Pixels outside the film keep NaN.
 */
export function boxMeanMasked(
  values: Float32Array,
  width: number,
  height: number,
  film: Uint8Array,
  radius: number,
): Float32Array {
  const n = width * height;
  const rowSum = new Float64Array(n);
  const rowCount = new Float64Array(n);
  for (let y = 0; y < height; y++) {
    const o = y * width;
    let s = 0;
    let c = 0;
    // Running window [x - radius, x + radius] along the row.
    for (let x = -radius; x < width; x++) {
      const add = x + radius;
      if (add < width && film[o + add]) {
        s += values[o + add];
        c++;
      }
      const drop = x - radius - 1;
      if (drop >= 0 && film[o + drop]) {
        s -= values[o + drop];
        c--;
      }
      if (x >= 0) {
        rowSum[o + x] = s;
        rowCount[o + x] = c;
      }
    }
  }
  const out = new Float32Array(n);
  for (let x = 0; x < width; x++) {
    let s = 0;
    let c = 0;
    for (let y = -radius; y < height; y++) {
      const add = y + radius;
      if (add < height) {
        s += rowSum[add * width + x];
        c += rowCount[add * width + x];
      }
      const drop = y - radius - 1;
      if (drop >= 0) {
        s -= rowSum[drop * width + x];
        c -= rowCount[drop * width + x];
      }
      if (y >= 0) {
        const p = y * width + x;
        out[p] = film[p] && c > 0 ? s / c : NaN;
      }
    }
  }
  return out;
}
