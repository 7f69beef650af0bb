/**
 * Builds the mapper's colour table for a stack, light and camera: the film thickness grid
 * (0 … maxThicknessNm at `stepNm`), spectra by the transfer-matrix engine, folded through the
 * camera's weight matrix into linear RGB. Also the thickness of one interference order at
 * mid-visible, λ/(2·n·cos θ_film) at 550 nm, which sets the continuity scale of order resolution.
 */
import { cameraFromSpec, filmColourTable, resolveLight, type Camera, type CameraSpec } from '../colour/index.js';
import type { Stack } from '../optics/types.js';
import type { ColourTable } from './colourTable.js';

export interface ColourTableRequest {
  readonly stack: Stack;
  readonly angleRad: number;
  readonly light: string;
  readonly whiteBalanceLight?: string | null;
  readonly filmIndexScale?: number;
  readonly maxThicknessNm: number;
  readonly stepNm?: number;
  /** The camera (see ../colour/cameraSpec.ts); default `srgb`. */
  readonly camera?: CameraSpec | null;
}

export interface BuiltColourTable {
  readonly table: ColourTable;
  readonly camera: Camera;
  readonly orderPeriodNm: number;
}

export function buildColourTable(request: ColourTableRequest): BuiltColourTable {
  const stepNm = request.stepNm ?? 1;
  if (!(request.maxThicknessNm > 0 && Number.isFinite(request.maxThicknessNm))) {
    throw new RangeError(`maxThicknessNm must be a finite number > 0, received ${request.maxThicknessNm}`);
  }
  const light = resolveLight(request.light);
  const whiteBalance = request.whiteBalanceLight ? resolveLight(request.whiteBalanceLight) : undefined;
  const camera = cameraFromSpec(request.camera, light, whiteBalance);
  const count = Math.floor(request.maxThicknessNm / stepNm) + 1;
  const thicknessesNm = new Float64Array(count);
  for (let i = 0; i < count; i++) thicknessesNm[i] = i * stepNm;
  const rgbLinear = filmColourTable(request.stack, camera, thicknessesNm, request.angleRad, 'mixed', request.filmIndexScale ?? 1);
  return {
    // Always matched in sRGB-encoded values: a linear photo is encoded before matching
    // (mapPhoto.ts), so colour distances, noise and distinct-colour counts are in the same
    // roughly perceptual units for every camera (a linear metric drowns dark colours).
    table: { startNm: 0, stepNm, count, rgbLinear, encoding: 'srgb' },
    camera,
    orderPeriodNm: orderPeriodNm(request.stack, request.angleRad, request.filmIndexScale ?? 1),
  };
}

/** λ/(2·n·cos θ) at 550 nm for the (first) film layer: one interference order. */
export function orderPeriodNm(stack: Stack, angleRad: number, filmIndexScale: number): number {
  const film = stack.layers.find((layer) => layer.thicknessNm === 'film');
  if (!film) throw new RangeError(`stack ${stack.name} has no layer of unknown ('film') thickness`);
  const n = film.material.indexAt(550).n * filmIndexScale;
  const n0 = stack.ambient.indexAt(550).n;
  const sinFilm = (n0 * Math.sin(angleRad)) / n;
  const cosFilm = Math.sqrt(Math.max(1e-6, 1 - sinFilm * sinFilm));
  return 550 / (2 * n * cosFilm);
}
