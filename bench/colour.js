// Benchmark of the colour engine.
//  1. The full chart table for 0–1999.75 nm at 0.25 nm (8,000 thicknesses × 401 wavelengths):
//     spectra, XYZ, camera RGB and CIELAB (chartTable()).
//  2. Rendering a 12-MP thickness map (4000 × 3000, thickness ramps 0–1500 nm) with renderPhoto(),
//     against the time sharp needs to JPEG-encode the same output (quality 92), in the same run.
//     Target: render time < 3 × JPEG encode time.
// Run after building: `node bench/colour.js` (or import benchColour()).
import { fileURLToPath } from 'node:url';
import { resolveLight } from '../dist/colour/lights.js';
import { encodeJpeg } from '../dist/io/encodeImage.js';
import { resolveStack } from '../dist/optics/resolveStack.js';
import { chartTable } from '../dist/render/chartTable.js';
import { renderPhoto } from '../dist/render/renderPhoto.js';

function best(repeats, fn) {
  let ms = Number.POSITIVE_INFINITY;
  let value;
  for (let r = 0; r < repeats; r++) {
    const t0 = performance.now();
    value = fn();
    ms = Math.min(ms, performance.now() - t0);
  }
  return { ms: Math.round(ms * 10) / 10, value };
}

async function bestAsync(repeats, fn) {
  let ms = Number.POSITIVE_INFINITY;
  for (let r = 0; r < repeats; r++) {
    const t0 = performance.now();
    await fn();
    ms = Math.min(ms, performance.now() - t0);
  }
  return Math.round(ms * 10) / 10;
}

/**
 * Returns { chart: { thicknesses, wavelengths, ms }, render: { width, height, renderMs, jpegMs, ratio,
 * noiseRenderMs } } with the best of `repeats` runs (after a warm-up).
 */
export async function benchColour({ repeats = 3 } = {}) {
  const stack = resolveStack('oxide-on-silicon');
  const light = resolveLight('D65');
  const chartOptions = { stack, light, angleRad: 0, fromNm: 0, toNm: 1999.75, stepNm: 0.25 };
  chartTable(chartOptions);
  const chart = best(repeats, () => chartTable(chartOptions));

  const width = 4000;
  const height = 3000;
  const map = new Float32Array(width * height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) map[y * width + x] = 1500 * (0.5 * x / width + 0.5 * y / height);
  }
  const options = { stack, light, angleRad: 0 };
  renderPhoto(map, width, height, options);
  const render = best(repeats, () => renderPhoto(map, width, height, options));
  const noisy = best(1, () => renderPhoto(map, width, height, { ...options, noiseSigma: 0.01 }));
  const image = { data: render.value.data, width, height, channels: 3 };
  await encodeJpeg(image, 92);
  const jpegMs = await bestAsync(repeats, () => encodeJpeg(image, 92));
  return {
    chart: { thicknesses: chart.value.thicknessesNm.length, wavelengths: 401, ms: chart.ms },
    render: { width, height, renderMs: render.ms, noiseRenderMs: noisy.ms, jpegMs, ratio: Math.round((render.ms / jpegMs) * 100) / 100 },
  };
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const result = await benchColour();
  console.log(JSON.stringify(result, null, 2));
}
