/**
 * The image codec (sharp), loaded with `require` rather than `import`. sharp is a CommonJS
 * package: imported from an ES module, Node first lexes it and each of its CommonJS dependencies
 * to find their export names, which cost about 0.13 s of CPU in every process and worker thread
 * that decodes or encodes an image (measured 2026-12-05: 0.19–0.20 s against 0.07 s to load it).
 * Same module, same instance: an `import` elsewhere gets this one from the require cache.
 */
import { createRequire } from 'node:module';
import type sharpModule from 'sharp';

const sharp: typeof sharpModule = createRequire(import.meta.url)('sharp');

export default sharp;
