/**
 * Limits on what the image reader accepts.
 *
 * MAX_PIXELS guards memory: a decoded photo is held as Float32 RGB (12 bytes per pixel), so
 * 100 megapixels already needs 1.2 GB before any processing. Larger images should be
 * down-sampled or cropped first. Callers may pass a lower limit; a higher one is refused.
 */
export const MAX_PIXELS = 100_000_000;

/**
 * The largest photo `lamella map`, `lamella calibrate` and `lamella series` accept: 50 megapixels.
 *
 * Measured peak memory (resident set, `/usr/bin/time -v`, Node 20, one photo, all outputs and
 * the report written): the colour mapper needs about 53 bytes per pixel over a ~140 MB base
 * (12 MP 0.80 GB, 48 MP 2.70 GB, 4:2:0 JPEGs, 2 Dec 2026, since a photo's outputs are encoded
 * and written at the same time; 43 bytes per pixel when they were written one after another:
 * 4 MP 0.30 GB, 8 MP 0.43 GB, 16 MP 0.65 GB, 48 MP 2.18 GB); the single-line (monochromatic)
 * mapper about 59 bytes per pixel (8 MP 0.64 GB, 24 MP 1.56 GB, 48 MP 2.97 GB). At this limit a
 * photo therefore stays within about 3.5 GB (16-bit files add ~3 bytes per pixel while decoding);
 * `lamella series` holds one photo per worker, so its bound is about 3.5 GB × workers (measured:
 * two workers on 16 MP frames peak at 1.15 GB, against 0.65 GB for one 16 MP `map`).
 * Larger photos are refused with a message naming the file and its size: crop or down-sample.
 */
export const MAP_MAX_PIXELS = 50_000_000;
