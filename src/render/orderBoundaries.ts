/**
 * Interference orders along a thickness axis, by our stated rule: an order ends and the next
 * begins at each local minimum of the luminance Y of the reflected light (the dark, dull
 * purple/violet bands where the colour sequence restarts). Minima shallower than 0.5 % of Y's
 * range (on both sides) are ignored, so noise and the flat high-order tail do not add orders. A film thinner than the first minimum is order 1.
 * Note: printed oxide charts (Pliskin & Conrad 1964) number orders differently (each of their
 * orders starts near a gold/yellow); this rule is ours.
 */

export function orderBoundaries(thicknessesNm: Float64Array, luminance: Float64Array): { order: Uint16Array; boundariesNm: number[] } {
  const n = thicknessesNm.length;
  const order = new Uint16Array(n).fill(1);
  if (n < 3) return { order, boundariesNm: [] };
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    lo = Math.min(lo, luminance[i]);
    hi = Math.max(hi, luminance[i]);
  }
  const depth = 0.005 * (hi - lo);
  const candidates: number[] = [];
  for (let i = 1; i < n - 1; i++) {
    if (luminance[i] < luminance[i - 1] && luminance[i] <= luminance[i + 1]) candidates.push(i);
  }
  // Keep minima whose neighbouring maxima rise at least `depth` above them on both sides.
  const kept: number[] = [];
  for (const i of candidates) {
    let left = luminance[i];
    for (let k = i - 1; k >= 0 && !(kept.length > 0 && k <= kept[kept.length - 1]); k--) left = Math.max(left, luminance[k]);
    let right = luminance[i];
    for (let k = i + 1; k < n; k++) {
      right = Math.max(right, luminance[k]);
      if (luminance[k] < luminance[i]) break;
    }
    if (left - luminance[i] >= depth && right - luminance[i] >= depth) kept.push(i);
  }
  const boundariesNm = kept.map((i) => thicknessesNm[i]);
  let current = 1;
  let next = 0;
  for (let i = 0; i < n; i++) {
    while (next < kept.length && i >= kept[next]) {
      current++;
      next++;
    }
    order[i] = current;
  }
  return { order, boundariesNm };
}
