/**
 * Helpers for the `lamella map` tests: invented thickness fields (our own scenarios, not
 * measurements), rendered into photos with the project's forward model (src/render/renderPhoto.ts)
 * and written with sharp, and a scorer that compares a map with the field it came from.
 * Everything here is a round trip through our own model; the forward model itself is checked
 * against outside references in the optics-*, colour-* and cli-render tests.
 */
import { writeFileSync } from 'node:fs';
import sharp from 'sharp';
import { resolveLight } from '../src/colour/index.js';
import type { MapResult } from '../src/map/types.js';
import { PixelStatus } from '../src/map/types.js';
import { resolveStack } from '../src/optics/index.js';
import { renderPhoto } from '../src/render/renderPhoto.js';

export type Field = (x: number, y: number) => number;

export function sampleField(width: number, height: number, fn: Field): Float32Array {
  const out = new Float32Array(width * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) out[y * width + x] = fn(x, y);
  return out;
}

export interface Shot {
  readonly stack: string;
  readonly light?: string;
  readonly angleDeg?: number;
  readonly exposure: number;
  readonly whiteBalance?: readonly [number, number, number];
  readonly flare?: number;
  readonly noise?: number;
  readonly seed?: number;
  readonly bitDepth?: 8 | 16;
}

/** Renders a thickness field to interleaved RGB samples (8- or 16-bit). */
export function shoot(truth: Float32Array, width: number, height: number, shot: Shot): Uint8Array | Uint16Array {
  return renderPhoto(truth, width, height, {
    stack: resolveStack(shot.stack),
    light: resolveLight(shot.light ?? 'D65'),
    angleRad: ((shot.angleDeg ?? 0) * Math.PI) / 180,
    exposure: shot.exposure,
    whiteBalance: shot.whiteBalance,
    flare: shot.flare ?? 0,
    noiseSigma: shot.noise ?? 0,
    seed: shot.seed ?? 1,
    bitDepth: shot.bitDepth ?? 8,
  }).data;
}

/**
 * Writes RGB samples as a camera would: JPEG, by default with 4:2:0 chroma subsampling (as most
 * cameras and phones write it; common practice), or lossless PNG/TIFF.
 */
export async function writePhoto(
  path: string,
  data: Uint8Array | Uint16Array,
  width: number,
  height: number,
  format: 'jpeg' | 'png' | 'tiff',
  quality = 90,
  chroma: '4:2:0' | '4:4:4' = '4:2:0',
): Promise<void> {
  const is16 = data instanceof Uint16Array;
  const image = sharp(is16 ? new Uint16Array(data) : new Uint8Array(data), { raw: { width, height, channels: 3 } }).toColourspace(
    is16 ? 'rgb16' : 'srgb',
  );
  const encoded =
    format === 'jpeg' ? image.jpeg({ quality, chromaSubsampling: chroma }) : format === 'png' ? image.png() : image.tiff({ compression: 'deflate' });
  writeFileSync(path, await encoded.toBuffer());
}

export interface Score {
  readonly medianAbsNm: number;
  readonly p95AbsNm: number;
  /** Share of estimates more than 50 nm off. */
  readonly gross: number;
  /** (estimates + pixels marked too dark) / pixels of the selection. */
  readonly coverage: number;
  readonly count: number;
}

/** Compares a map with its truth over the pixels where `select(i)` is true (default: all). */
export function scoreMap(truth: Float32Array, result: MapResult, select: (i: number) => boolean = () => true): Score {
  const errors: number[] = [];
  let selected = 0;
  let dark = 0;
  for (let i = 0; i < truth.length; i++) {
    if (!select(i)) continue;
    selected++;
    if (result.status[i] === PixelStatus.dark) dark++;
    if (result.status[i] !== PixelStatus.ok) continue;
    errors.push(Math.abs(result.thicknessNm[i] - truth[i]));
  }
  errors.sort((a, b) => a - b);
  const at = (p: number): number => (errors.length === 0 ? NaN : errors[Math.min(errors.length - 1, Math.floor(p * errors.length))]);
  return {
    medianAbsNm: at(0.5),
    p95AbsNm: at(0.95),
    gross: errors.length === 0 ? NaN : errors.filter((e) => e > 50).length / errors.length,
    coverage: selected === 0 ? NaN : (errors.length + dark) / selected,
    count: errors.length,
  };
}
