/**
 * Photographed draining films with a known motion, for the flow's end-to-end checks (invented
 * scenes, a scenario of our own; rendered with our own forward model, so mapping them back is a
 * round trip). A soap film in a dark holder (a frame 8 px wide, rendered black), thin at the top
 * and thick at the bottom (gravity stratification, 250 → 900 nm), with a multi-scale texture of
 * ±25 nm carried by the flow, thinning uniformly, and sensor noise. Frame k is the first frame's
 * thickness field carried k times by the motion, minus k times the thinning.
 */
import { mkdir } from 'node:fs/promises';
import { join } from 'node:path';
import { renderPhoto } from '../src/render/renderPhoto.js';
import { resolveLight } from '../src/colour/lights.js';
import { resolveStack } from '../src/optics/index.js';
import { writeImage } from '../src/io/writeImage.js';
import { texture } from './flow-scenes.js';

export const HOLDER_PX = 8;

/** The film's thickness on the plane at time zero (nm): stratification plus texture. */
export function filmField(width: number, height: number, seed = 11): (x: number, y: number) => number {
  const tex = texture(seed);
  return (x, y) => 250 + (650 * y) / height + 0.5 * (tex(x, y) - 600);
}

export interface FilmScene {
  readonly name: string;
  readonly width: number;
  readonly height: number;
  /** Where a point of frame k's image came from in frame 0 after k steps: the inverse of the motion applied k times. */
  readonly source: (x: number, y: number, k: number) => [number, number];
  /** True displacement of the point at (x, y) of frame k over one frame, px. */
  readonly velocity: (x: number, y: number) => [number, number];
  /** Thickness change per frame, nm (negative: thinning). */
  readonly changeNmPerFrame: number;
  /** An extra thin patch: centre at frame k and its depth profile (nm removed), or null. */
  readonly patch?: { readonly centre: (k: number) => [number, number]; readonly radiusPx: number } | null;
}

export function thicknessOf(scene: FilmScene, k: number): Float32Array {
  const { width, height } = scene;
  const field = filmField(width, height);
  const out = new Float32Array(width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      if (x < HOLDER_PX || y < HOLDER_PX || x >= width - HOLDER_PX || y >= height - HOLDER_PX) {
        out[i] = NaN; // the holder: rendered black
        continue;
      }
      const [sx, sy] = scene.source(x, y, k);
      let h = field(sx, sy) + k * scene.changeNmPerFrame;
      if (scene.patch) {
        const [cx, cy] = scene.patch.centre(k);
        const r2 = ((x - cx) ** 2 + (y - cy) ** 2) / scene.patch.radiusPx ** 2;
        // A thin patch with a smooth rim: 60 nm in the middle, blending into the film around it.
        const blend = r2 < 1 ? 1 : Math.exp(-4 * (r2 - 1));
        h = h * (1 - blend) + 60 * blend;
      }
      out[i] = h;
    }
  }
  return out;
}

/** Renders frames 0…count−1 of the scene as 8-bit PNG photos in `folder`; returns their thickness maps. */
export async function renderScene(scene: FilmScene, folder: string, count: number): Promise<Float32Array[]> {
  await mkdir(folder, { recursive: true });
  const stack = resolveStack('soap-film');
  const truths: Float32Array[] = [];
  for (let k = 0; k < count; k++) {
    const h = thicknessOf(scene, k);
    const photo = renderPhoto(h, scene.width, scene.height, { stack, light: resolveLight('D65'), exposure: 6.5, flare: 0.01, noiseSigma: 0.003, seed: k + 1 });
    await writeImage(join(folder, `${scene.name}_${String(k + 1).padStart(3, '0')}.png`), { data: photo.data, width: scene.width, height: scene.height, channels: 3 });
    truths.push(h);
  }
  return truths;
}

export function translationScene(width: number, height: number, uPx: number, vPx: number): FilmScene {
  return { name: 'translate', width, height, source: (x, y, k) => [x - k * uPx, y - k * vPx], velocity: () => [uPx, vPx], changeNmPerFrame: -4 };
}

export function rotationScene(width: number, height: number, angleRadPerFrame: number): FilmScene {
  const cx = (width - 1) / 2;
  const cy = (height - 1) / 2;
  return {
    name: 'rotate', width, height, changeNmPerFrame: -4,
    source: (x, y, k) => {
      const c = Math.cos(k * angleRadPerFrame);
      const s = Math.sin(k * angleRadPerFrame);
      return [cx + c * (x - cx) + s * (y - cy), cy - s * (x - cx) + c * (y - cy)];
    },
    velocity: (x, y) => {
      const c = Math.cos(angleRadPerFrame);
      const s = Math.sin(angleRadPerFrame);
      return [cx + c * (x - cx) - s * (y - cy) - x, cy + s * (x - cx) + c * (y - cy) - y];
    },
  };
}

/** Simple shear: u = rate · (y − centre), v = 0 (a film sliding past itself). */
export function shearScene(width: number, height: number, ratePerFrame: number): FilmScene {
  const cy = (height - 1) / 2;
  return {
    name: 'shear', width, height, changeNmPerFrame: -4,
    source: (x, y, k) => [x - k * ratePerFrame * (y - cy), y],
    velocity: (_x, y) => [ratePerFrame * (y - cy), 0],
  };
}

/** A still film with a thin patch rising at `risePxPerFrame` (up the image) from near the bottom. */
export function risingPatchScene(width: number, height: number, risePxPerFrame: number): FilmScene {
  const x0 = width / 2;
  const y0 = height - HOLDER_PX - 22;
  return {
    name: 'patch', width, height, changeNmPerFrame: -3,
    source: (x, y) => [x, y],
    velocity: () => [0, 0],
    patch: { centre: (k) => [x0, y0 - k * risePxPerFrame], radiusPx: 7 },
  };
}
