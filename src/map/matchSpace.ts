/**
 * The colour space in which photo colours are matched against the table. By default the
 * encoded RGB values themselves. For JPEGs that store colour at reduced resolution (chroma
 * subsampling, e.g. 4:2:0 — ITU-T T.81 / JFIF), the chroma of a pixel is an average over its
 * neighbours, so where thickness changes steeply it is a mixture that matches no thickness while
 * the luma is still the pixel's own. Colours are then matched in JPEG's own Y′CbCr (ITU-T T.871,
 * full range) with the chroma axes scaled by `chromaWeight` (< 1), which lowers the weight of
 * chroma errors in the colour distance by chromaWeight². All values stay within [0, 1].
 */

export interface MatchSpace {
  /** Row-major 3×3 matrix applied to encoded RGB, then `offset` added. */
  readonly matrix: Float64Array;
  readonly offset: Float64Array;
}

export function chromaWeightFor(format: string, chromaSubsampling: string | undefined): number {
  if (format !== 'jpeg' || !chromaSubsampling) return 1;
  return chromaSubsampling === '4:4:4' ? 1 : CHROMA_WEIGHT_SUBSAMPLED;
}

/** Weight of chroma against luma for subsampled JPEGs (a judgement, tuned on invented scenes). */
export const CHROMA_WEIGHT_SUBSAMPLED = 0.7;

export function matchSpace(chromaWeight: number): MatchSpace | null {
  if (chromaWeight >= 1) return null;
  const w = chromaWeight;
  // ITU-T T.871 (JFIF) full-range Y′CbCr from R′G′B′ in [0, 1].
  const matrix = Float64Array.of(
    0.299, 0.587, 0.114,
    -0.168736 * w, -0.331264 * w, 0.5 * w,
    0.5 * w, -0.418688 * w, -0.081312 * w,
  );
  return { matrix, offset: Float64Array.of(0, 0.5, 0.5) };
}

/** Applies the space to n × 3 colours, writing into `out` (may be the input). */
export function toMatchSpace<T extends Float32Array>(space: MatchSpace, colours: Float32Array, out: T): T {
  const m = space.matrix;
  const o = space.offset;
  for (let i = 0; i < colours.length; i += 3) {
    const r = colours[i];
    const g = colours[i + 1];
    const b = colours[i + 2];
    out[i] = m[0] * r + m[1] * g + m[2] * b + o[0];
    out[i + 1] = m[3] * r + m[4] * g + m[5] * b + o[1];
    out[i + 2] = m[6] * r + m[7] * g + m[8] * b + o[2];
  }
  return out;
}
