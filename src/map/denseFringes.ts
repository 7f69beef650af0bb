/**
 * Fringes too dense for the photo's resolution. Each fringe period of thickness (`orderPeriodNm`,
 * λ/2n) brings the colours round once; to tell one fringe from the next, the colours must be
 * sampled at least twice per period (the sampling theorem), and a JPEG with 4:2:0 chroma holds
 * colour at half the pixel resolution, so at least four pixels per period: a thickness step of
 * more than a quarter period between neighbouring pixels (`DENSE_STEP_SHARE`) is past what the
 * photo can resolve. There, colours of neighbouring fringes mix, and a continuous field of the
 * wrong order fits them as well as the right one (measured on the demo's 320 × 240 frames: the
 * steep film at the frame's sides, 30–65 nm per pixel, held nearly all gross errors, a third of
 * them with confidence above 0.5).
 *
 * The check reads the map as measured (a wrong order can look smoother than the truth, so it
 * counts fewer pixels than are at risk, never more) and says so in plain words when the share of
 * such pixels in the film is large enough to matter.
 */

/** A step of more than this share of a fringe period between neighbouring pixels is too dense (see above). */
export const DENSE_STEP_SHARE = 0.25;
/** Warn when more than this share of the measured pixels are at such steps (a judgement: 0.5 %). */
export const DENSE_WARN_SHARE = 0.005;

/**
 * Measured pixels (finite thickness) whose thickness differs from a measured right or lower
 * neighbour by more than `limitNm`; each pixel counted once, both pixels of a step counted.
 */
export function denseFringePixels(thicknessNm: Float32Array, width: number, height: number, limitNm: number): { dense: number; measured: number } {
  let measured = 0;
  let dense = 0;
  // Whether each pixel of the current row was counted through its upper neighbour's step.
  let fromAbove = new Uint8Array(width);
  let next = new Uint8Array(width);
  for (let y = 0; y < height; y++) {
    const row = y * width;
    const below = y + 1 < height ? row + width : -1;
    next.fill(0);
    let fromLeft = 0;
    for (let x = 0; x < width; x++) {
      const t = thicknessNm[row + x];
      if (t !== t) {
        fromLeft = 0;
        continue;
      }
      measured++;
      let steep = fromLeft === 1 || fromAbove[x] === 1;
      fromLeft = 0;
      if (x + 1 < width) {
        const r = thicknessNm[row + x + 1];
        if (r === r && Math.abs(r - t) > limitNm) {
          steep = true;
          fromLeft = 1;
        }
      }
      if (below >= 0) {
        const d = thicknessNm[below + x];
        if (d === d && Math.abs(d - t) > limitNm) {
          steep = true;
          next[x] = 1;
        }
      }
      if (steep) dense++;
    }
    const swap = fromAbove;
    fromAbove = next;
    next = swap;
  }
  return { dense, measured };
}

/** The plain-words warning, or null when the share of dense-fringe pixels is small. */
export function denseFringeWarning(thicknessNm: Float32Array, width: number, height: number, orderPeriodNm: number): string | null {
  if (!(orderPeriodNm > 0)) return null;
  const limitNm = DENSE_STEP_SHARE * orderPeriodNm;
  const { dense, measured } = denseFringePixels(thicknessNm, width, height, limitNm);
  if (measured === 0 || dense <= DENSE_WARN_SHARE * measured) return null;
  const percent = (100 * dense) / measured;
  return (
    `${dense} measured pixels (${percent < 1 ? percent.toFixed(2) : percent.toFixed(1)} %) lie where the thickness changes by more than ` +
    `${Math.round(limitNm)} nm (a quarter of a fringe) from one pixel to the next: the fringes there are too dense for the photo's resolution, ` +
    `and those thicknesses may be a whole order off. A closer or sharper photo resolves them; the confidence map shows where`
  );
}
