/**
 * Limits on what the image reader accepts.
 *
 * MAX_PIXELS guards memory: a decoded photo is held as Float32 RGB (12 bytes per pixel), so
 * 100 megapixels already needs 1.2 GB before any processing. Larger images should be
 * down-sampled or cropped first. Callers may pass a lower limit; a higher one is refused.
 */
export const MAX_PIXELS = 100_000_000;
