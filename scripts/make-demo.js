#!/usr/bin/env node
/**
 * Makes the bundled demo series `fixtures/demo/` (INVENTED DATA, our own scenario):
 *
 * A vertical rectangular wire frame holds a film of dilute dish-soap solution (mostly water,
 * modelled with the `soap-film` preset: water film in air), photographed twice a second under a D65 daylight panel for
 * 12.5 s (25 frames, 320×240 px, JPEG quality 90, no EXIF, so the demo passes --fps 2).
 *
 * Invented drainage model, t in s, y = 0 at the top of the frame and 1 at the bottom:
 *   gravity wedge  h_w(y, t) = (H_TOP + (H_BOTTOM − H_TOP)·y^0.7) · (1 + t/TAU)^(−1/2)
 *                  (thin at the top, thick at the bottom, thinning like Reynolds' law);
 *   black film     above y_b(t) = 0.03 + 0.22·(t/T_END)^1.2 the film is BLACK_NM thick, with a
 *                  soft front (a few px), growing down from the top bar;
 *   marginal regeneration: within ~30 px of the side wires, thinner film patches rise in a
 *                  swirling band, depth up to 35 % of the local thickness;
 *   a gentle left–right ripple of ±3 %.
 * Photo formation (see src/render/renderPhoto.ts): exposure EXPOSURE (a soap film reflects a
 * few per cent, so the camera is exposed ×5–9), white balance slightly off, flare 0.01,
 * Gaussian noise σ = 0.004, then JPEG quality 90 through src/io.
 *
 * Usage: `npx tsc -p tsconfig.build.json && node scripts/make-demo.js [outDir] [frames] [size WxH]`
 * (defaults: fixtures/demo 25 320x240). The functions are also used by bench/series-accuracy.js.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { renderPhoto } from '../dist/render/renderPhoto.js';
import { resolveLight } from '../dist/colour/lights.js';
import { stackFromOptions } from '../dist/cli/stackOptions.js';
import { writeImage } from '../dist/io/writeImage.js';

export const DEMO = {
  fps: 2,
  H_TOP: 320,
  H_BOTTOM: 1350,
  TAU: 5,
  T_END: 12,
  BLACK_NM: 8,
  EXPOSURE: 7,
  WHITE_BALANCE: [1.04, 1, 0.95],
  FLARE: 0.01,
  NOISE: 0.004,
  THIN_BELOW_NM: 100,
  stackOptions: { stack: 'soap-film' },
};

/** The invented film thickness (nm) at time tS on a width×height grid, row-major. */
export function demoThickness(tS, width, height) {
  const h = new Float32Array(width * height);
  const decay = 1 / Math.sqrt(1 + tS / DEMO.TAU);
  const front = 0.03 + 0.22 * Math.pow(Math.min(tS, DEMO.T_END) / DEMO.T_END, 1.2);
  const frontWidth = 3 / height;
  const edge = 30 / width;
  for (let row = 0; row < height; row++) {
    const y = (row + 0.5) / height;
    const wedge = (DEMO.H_TOP + (DEMO.H_BOTTOM - DEMO.H_TOP) * Math.pow(y, 0.7)) * decay;
    const black = 1 / (1 + Math.exp((y - front) / frontWidth));
    for (let col = 0; col < width; col++) {
      const x = (col + 0.5) / width;
      const dx = Math.min(x, 1 - x);
      const swirl = 0.5 + 0.5 * Math.sin(2 * Math.PI * ((y + 0.12 * tS) / 0.11) + 3 * Math.sin((2 * Math.PI * dx) / (1.3 * edge)) + (x > 0.5 ? 1.7 : 0));
      const regeneration = 1 - 0.35 * Math.exp(-((dx / edge) ** 2)) * swirl * (y > front ? 1 : 0);
      const ripple = 1 + 0.03 * Math.sin(2 * Math.PI * 1.5 * x + 0.4 * tS);
      const film = wedge * regeneration * ripple;
      h[row * width + col] = black * DEMO.BLACK_NM + (1 - black) * film;
    }
  }
  return h;
}

/** Renders frame `index` (t = index / fps) as 8-bit RGB with the demo's photo formation. */
export function renderDemoFrame(index, width, height, fps = DEMO.fps) {
  const { stack, angleRad } = stackFromOptions(DEMO.stackOptions);
  const thicknessNm = demoThickness(index / fps, width, height);
  const photo = renderPhoto(thicknessNm, width, height, {
    stack,
    angleRad,
    light: resolveLight('D65'),
    exposure: DEMO.EXPOSURE,
    whiteBalance: DEMO.WHITE_BALANCE,
    flare: DEMO.FLARE,
    noiseSigma: DEMO.NOISE,
    seed: 1000 + index,
  });
  return { thicknessNm, image: { data: photo.data, width, height, channels: 3 } };
}

/** Truth per frame for the threshold: mean and minimum of the film, share below it. */
export function truthStats(thicknessNm, thinBelowNm) {
  let sum = 0;
  let min = Infinity;
  let thin = 0;
  for (const v of thicknessNm) {
    sum += v;
    if (v < min) min = v;
    if (v < thinBelowNm) thin++;
  }
  return { meanNm: sum / thicknessNm.length, minNm: min, thinFraction: thin / thicknessNm.length };
}

async function main() {
  const root = fileURLToPath(new URL('..', import.meta.url));
  const outDir = process.argv[2] ?? join(root, 'fixtures', 'demo');
  const frames = Number(process.argv[3] ?? 25);
  const [width, height] = (process.argv[4] ?? '320x240').split('x').map(Number);
  await mkdir(outDir, { recursive: true });
  const lines = ['frame,time_s,true_mean_nm,true_min_nm,true_thin_fraction'];
  for (let i = 0; i < frames; i++) {
    const name = `film_${String(i + 1).padStart(3, '0')}.jpg`;
    const { thicknessNm, image } = renderDemoFrame(i, width, height);
    await writeImage(join(outDir, name), image, { quality: 90 });
    const t = truthStats(thicknessNm, DEMO.THIN_BELOW_NM);
    lines.push(`${name},${(i / DEMO.fps).toFixed(3)},${t.meanNm.toFixed(2)},${t.minNm.toFixed(2)},${t.thinFraction.toFixed(4)}`);
  }
  await writeFile(join(outDir, 'truth.csv'), `${lines.join('\n')}\n`);
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) await main();
