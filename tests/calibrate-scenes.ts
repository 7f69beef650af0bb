/**
 * Helpers for the calibration tests: an INVENTED step wafer (six oxide patches, our own scenario,
 * not a measured sample) and an invented production wafer (a bowl of oxide), rendered into photos
 * with the project's own forward model (src/render/renderPhoto.ts), written with sharp, and the
 * CLI run as a user runs it (bin/lamella.js on the built dist/; `npm test` builds first).
 * Everything rendered here is a round trip through our own model; the model itself is checked
 * against outside references in the optics-*, colour-* and cli-render tests.
 */
import { spawn, spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { resolveLight } from '../src/colour/index.js';
import type { KnownRegion } from '../src/calibrate/knownRegions.js';
import { resolveStack } from '../src/optics/index.js';
import { renderPhoto, type RenderOptions } from '../src/render/renderPhoto.js';

export const WIDTH = 300;
export const HEIGHT = 200;
/** Patch thicknesses of the invented step wafer, nm (3 columns × 2 rows of 100 × 100 px). */
export const STEP_THICKNESSES_NM = [0, 92, 185, 275, 370, 460] as const;

/** The step wafer: patch k covers columns 100·(k mod 3)… and rows 100·⌊k/3⌋…, 100 px each. */
export function stepWafer(): Float32Array {
  const out = new Float32Array(WIDTH * HEIGHT);
  for (let y = 0; y < HEIGHT; y++) {
    for (let x = 0; x < WIDTH; x++) out[y * WIDTH + x] = STEP_THICKNESSES_NM[Math.floor(y / 100) * 3 + Math.floor(x / 100)];
  }
  return out;
}

/** The known rectangle inside patch k: 60 × 60 px, 20 px in from the patch edges. */
export function patchRect(k: number): [number, number, number, number] {
  return [(k % 3) * 100 + 20, Math.floor(k / 3) * 100 + 20, 60, 60];
}

export function stepKnownRegions(): KnownRegion[] {
  return STEP_THICKNESSES_NM.map((thicknessNm, k) => ({ region: patchRect(k), thicknessNm }));
}

/** The same rectangles as repeated `--known X,Y,W,H=NM` arguments. */
export function stepKnownArgs(): string[] {
  return STEP_THICKNESSES_NM.flatMap((nm, k) => ['--known', `${patchRect(k).join(',')}=${nm}`]);
}

/** Invented production wafer: a bowl of oxide, 250 nm in the middle rising to 400 nm in the corners. */
export function bowlWafer(): Float32Array {
  const out = new Float32Array(WIDTH * HEIGHT);
  for (let y = 0; y < HEIGHT; y++) {
    for (let x = 0; x < WIDTH; x++) {
      const r2 = ((x - WIDTH / 2) / (WIDTH / 2)) ** 2 + ((y - HEIGHT / 2) / (HEIGHT / 2)) ** 2;
      out[y * WIDTH + x] = 250 + 75 * r2;
    }
  }
  return out;
}

export interface Shot extends Omit<RenderOptions, 'stack' | 'light' | 'whiteBalanceLight'> {
  readonly stack?: string;
  readonly light?: string;
  readonly whiteBalanceLight?: string;
}

/** Renders a thickness field to 8-bit RGB samples. */
export function shoot(thicknessNm: Float32Array, shot: Shot): Uint8Array {
  const { stack, light, whiteBalanceLight, ...rest } = shot;
  const result = renderPhoto(thicknessNm, WIDTH, HEIGHT, {
    ...rest,
    stack: resolveStack(stack ?? 'oxide-on-silicon'),
    light: resolveLight(light ?? 'D65'),
    whiteBalanceLight: whiteBalanceLight ? resolveLight(whiteBalanceLight) : undefined,
    bitDepth: 8,
  });
  return result.data as Uint8Array;
}

/** 8-bit samples as the photo reader returns them (value / 255), for in-process calls. */
export function asDecoded(samples: Uint8Array): Float32Array {
  return Float32Array.from(samples, (v) => v / 255);
}

/** Writes samples as PNG (lossless) or JPEG (quality, 4:2:0 chroma as cameras write it; common practice). */
export async function writePhoto(path: string, samples: Uint8Array, format: 'png' | 'jpeg', quality = 92): Promise<void> {
  const image = sharp(Buffer.from(samples), { raw: { width: WIDTH, height: HEIGHT, channels: 3 } });
  const encoded = format === 'png' ? image.png() : image.jpeg({ quality, chromaSubsampling: '4:2:0' });
  writeFileSync(path, await encoded.toBuffer());
}

const root = new URL('..', import.meta.url).pathname;
const bin = join(root, 'bin', 'lamella.js');

export interface Run {
  readonly status: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

export function lamella(cwd: string, ...args: string[]): Run {
  const result = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

/** The same, without blocking, so that independent runs can overlap (2 cores). */
export function lamellaAsync(cwd: string, ...args: string[]): Promise<Run> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [bin, ...args], { cwd });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (chunk: Buffer) => (stdout += chunk.toString('utf8')));
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString('utf8')));
    child.on('error', reject);
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}

export interface Score {
  readonly medianAbsNm: number;
  readonly p95AbsNm: number;
  /** Share of mapped pixels more than 50 nm off. */
  readonly gross: number;
  /** Share of pixels with a finite thickness. */
  readonly coverage: number;
}

/** Compares a thickness map (NaN = no estimate) with the field it was rendered from. */
export function scoreThickness(truth: Float32Array, mapped: ArrayLike<number>): Score {
  const errors: number[] = [];
  for (let i = 0; i < truth.length; i++) if (Number.isFinite(mapped[i])) errors.push(Math.abs(mapped[i] - truth[i]));
  errors.sort((a, b) => a - b);
  const at = (p: number): number => errors[Math.min(errors.length - 1, Math.floor(p * errors.length))];
  return {
    medianAbsNm: errors.length === 0 ? NaN : at(0.5),
    p95AbsNm: errors.length === 0 ? NaN : at(0.95),
    gross: errors.length === 0 ? NaN : errors.filter((e) => e > 50).length / errors.length,
    coverage: errors.length / truth.length,
  };
}
