/**
 * Scenes for the camera-response tests (tests/map-response.test.ts, tests/calibrate-response.test.ts).
 * INVENTED scenarios of our own, not measurements: a lab's draining soap film (D65) and an oxide
 * wafer with a bowl and etched steps under a fluorescent lamp (F11), rendered with the project's
 * forward model (src/render/renderPhoto.ts: exposure, flare, sensor noise, sRGB encode at 16 bits),
 * then given a camera picture style on the encoded values and written as 8-bit JPEG (quality 90,
 * 4:2:0 chroma, as cameras write them; common practice).
 *
 * The picture style here is deliberately NOT the fit's family (../src/colour/toneResponse.ts uses a
 * power of a rational S-curve blended with identity): a logistic S-curve renormalised to pass
 * through (0, 0) and (1, 1), blended with the identity, then the chroma of BT.601 YCbCr
 * (ITU-R BT.601; the YCbCr of JPEG/JFIF, ITU-T T.871) scaled by a factor about luma, and clipped
 * to 0..1. Mapping such a photo is a round trip through our own optics and camera model; only the
 * style's formula comes from outside the fit.
 */
import sharp from 'sharp';
import { resolveLight } from '../src/colour/index.js';
import { resolveStack } from '../src/optics/index.js';
import { renderPhoto } from '../src/render/renderPhoto.js';
import type { Photo } from '../src/io/photo.js';
import { readPhoto } from '../src/io/readPhoto.js';
import { writeFileSync } from 'node:fs';

export const SCENE_WIDTH = 240;
export const SCENE_HEIGHT = 180;

export interface PictureStyle {
  /** Steepness of the logistic (per unit of encoded value). */
  readonly steepness: number;
  /** Weight of the logistic in the blend with the identity (0 = no curve). */
  readonly weight: number;
  /** Centre of the logistic (encoded value). */
  readonly centre: number;
  /** Chroma factor in BT.601 YCbCr. */
  readonly saturation: number;
}

/** An everyday picture style: a firm S-curve and a saturation boost of 1.25 (our own choice of numbers). */
export const EVERYDAY_STYLE: PictureStyle = { steepness: 8, weight: 0.6, centre: 0.5, saturation: 1.25 };

function logistic(x: number): number {
  return 1 / (1 + Math.exp(-x));
}

/** The style's tone curve: renormalised logistic blended with the identity. */
export function styleTone(v: number, style: PictureStyle): number {
  const a = style.steepness;
  const lo = logistic(-a * style.centre);
  const hi = logistic(a * (1 - style.centre));
  const s = (logistic(a * (v - style.centre)) - lo) / (hi - lo);
  return (1 - style.weight) * v + style.weight * s;
}

/** Applies a picture style to encoded values (0..1, interleaved RGB) in place. */
export function applyStyle(encoded: Float64Array, style: PictureStyle): void {
  for (let i = 0; i < encoded.length; i += 3) {
    const r = styleTone(encoded[i], style);
    const g = styleTone(encoded[i + 1], style);
    const b = styleTone(encoded[i + 2], style);
    // BT.601 YCbCr (full range, as JFIF): Y = .299R + .587G + .114B, Cb = (B − Y)/1.772, Cr = (R − Y)/1.402.
    const y = 0.299 * r + 0.587 * g + 0.114 * b;
    const cb = ((b - y) / 1.772) * style.saturation;
    const cr = ((r - y) / 1.402) * style.saturation;
    const r2 = y + 1.402 * cr;
    const b2 = y + 1.772 * cb;
    const g2 = (y - 0.299 * r2 - 0.114 * b2) / 0.587;
    encoded[i] = Math.min(1, Math.max(0, r2));
    encoded[i + 1] = Math.min(1, Math.max(0, g2));
    encoded[i + 2] = Math.min(1, Math.max(0, b2));
  }
}

/** Invented soap-film field: a gravity wedge 70 nm → ≈ 1.2 µm with gentle swirls (no film below 60 nm). */
export function soapFilmNm(seed = 0): Float32Array {
  const out = new Float32Array(SCENE_WIDTH * SCENE_HEIGHT);
  for (let y = 0; y < SCENE_HEIGHT; y++) {
    for (let x = 0; x < SCENE_WIDTH; x++) {
      const v = y / (SCENE_HEIGHT - 1);
      out[y * SCENE_WIDTH + x] = 70 + 1100 * Math.pow(v, 1.25) + 35 * Math.sin(x / (17 + seed) + y / 37) * (0.3 + v);
    }
  }
  return out;
}

/** Invented oxide wafer: a bowl 420–600 nm with two etched steps (−150 and −300 nm). */
export function oxideWaferNm(seed = 0): Float32Array {
  const out = new Float32Array(SCENE_WIDTH * SCENE_HEIGHT);
  for (let y = 0; y < SCENE_HEIGHT; y++) {
    for (let x = 0; x < SCENE_WIDTH; x++) {
      const r2 = ((x - SCENE_WIDTH / 2) ** 2 + (y - SCENE_HEIGHT / 2) ** 2) / (SCENE_WIDTH / 2) ** 2;
      let d = 420 + 180 * r2 + 10 * Math.sin(x / (23 + seed));
      if (x > SCENE_WIDTH * 0.62 && y < SCENE_HEIGHT * 0.45) d -= 150;
      if (x < SCENE_WIDTH * 0.3 && y > SCENE_HEIGHT * 0.6) d -= 300;
      out[y * SCENE_WIDTH + x] = d;
    }
  }
  return out;
}

export interface Take {
  readonly stack: 'soap-film' | 'oxide-on-silicon';
  readonly light: 'D65' | 'F11';
  readonly exposure: number;
  readonly flare: number;
  readonly noise: number;
  readonly seed: number;
  /** null = no picture style (a clean sRGB photo). */
  readonly style: PictureStyle | null;
}

/** Renders a field, applies the style, and returns the 8-bit samples. */
export function takePhoto(truthNm: Float32Array, take: Take): Uint8Array {
  const rendered = renderPhoto(truthNm, SCENE_WIDTH, SCENE_HEIGHT, {
    stack: resolveStack(take.stack),
    light: resolveLight(take.light),
    angleRad: 0,
    exposure: take.exposure,
    flare: take.flare,
    noiseSigma: take.noise,
    seed: take.seed,
    bitDepth: 16,
  }).data;
  const encoded = new Float64Array(rendered.length);
  for (let i = 0; i < rendered.length; i++) encoded[i] = rendered[i] / 65535;
  if (take.style) applyStyle(encoded, take.style);
  const out = new Uint8Array(encoded.length);
  for (let i = 0; i < encoded.length; i++) out[i] = Math.round(encoded[i] * 255);
  return out;
}

/** Writes 8-bit samples as a camera JPEG (quality 90, 4:2:0) and reads it back as the mapper would. */
export async function asCameraJpeg(path: string, samples: Uint8Array): Promise<Photo> {
  const buffer = await sharp(samples, { raw: { width: SCENE_WIDTH, height: SCENE_HEIGHT, channels: 3 } })
    .jpeg({ quality: 90, chromaSubsampling: '4:2:0' })
    .toBuffer();
  writeFileSync(path, buffer);
  return readPhoto(path);
}

/**
 * Invented step wafer for a calibration: six oxide patches (3 × 2, 80 × 90 px) of known thickness
 * on silicon, our own choice of values spanning dark, mid and bright colours under F11.
 */
export const STEP_NM = [40, 120, 210, 300, 390, 480] as const;

export function stepWaferNm(): Float32Array {
  const out = new Float32Array(SCENE_WIDTH * SCENE_HEIGHT);
  for (let y = 0; y < SCENE_HEIGHT; y++) {
    for (let x = 0; x < SCENE_WIDTH; x++) out[y * SCENE_WIDTH + x] = STEP_NM[Math.min(2, Math.floor(x / 80)) + 3 * Math.min(1, Math.floor(y / 90))];
  }
  return out;
}

/** The known rectangles of the step wafer (50 × 50 px inside each patch, away from its edges). */
export function stepKnown(): Array<{ region: [number, number, number, number]; thicknessNm: number }> {
  return STEP_NM.map((thicknessNm, k) => ({ region: [15 + 80 * (k % 3), 20 + 90 * Math.floor(k / 3), 50, 50], thicknessNm }));
}
