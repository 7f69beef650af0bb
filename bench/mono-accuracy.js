// Accuracy and speed of the monochromatic mode on invented draining soap films (our scenario, a
// round trip through our own forward model): thickness field → R(h) at the Hg 546.07 nm line →
// linear intensity with gain, flare, optional vignetting and Gaussian noise → sRGB 8-bit →
// mapLineIntensity(). Reports, per scenario, the median |error| below 100 nm, the share of pixels
// with the right fringe order, the share of film pixels with an estimate, and the time.
// Run after building: `node bench/mono-accuracy.js` (or import benchMonoAccuracy()).
import { fileURLToPath } from 'node:url';
import { branchOfThickness } from '../dist/mono/lineReflectanceTable.js';
import { mapLineIntensity } from '../dist/mono/mapLineIntensity.js';
import { stackLineTable } from '../dist/mono/stackLineReflectance.js';
import { resolveStack } from '../dist/optics/resolveStack.js';
import { createUniform } from '../dist/colour/seededNormal.js';

const LINE_NM = 546.07;

function normalSource(seed) {
  const uniform = createUniform(seed);
  return () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
}

const encode = (v) => {
  const x = Math.min(1, Math.max(0, v));
  return x <= 0.0031308 ? 12.92 * x : 1.055 * Math.pow(x, 1 / 2.4) - 0.055;
};

function render(table, { width, height, bottomNm, noise, vignette, seed }) {
  const truth = new Float32Array(width * height);
  const rgb = new Float32Array(3 * width * height);
  const gauss = normalSource(seed);
  const gain = 0.62 / table.levelMax;
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const depth = y / (height - 1);
      let h = bottomNm * Math.pow(depth, 1.4) + 18 * Math.sin((2 * Math.PI * x) / width) * depth;
      if (h < 25) h = 5;
      const p = y * width + x;
      truth[p] = h;
      const i = Math.min(table.reflectance.length - 2, Math.floor(h / table.stepNm));
      const f = h / table.stepNm - i;
      const R = table.reflectance[i] * (1 - f) + table.reflectance[i + 1] * f;
      const r2 = ((x - width / 2) ** 2 + (y - height / 2) ** 2) / ((width / 2) ** 2 + (height / 2) ** 2);
      const v = Math.round(255 * encode(gain * (1 - vignette * r2) * R + 0.015 + noise * gauss())) / 255;
      rgb[3 * p] = rgb[3 * p + 1] = rgb[3 * p + 2] = v;
    }
  }
  return { photo: { width, height, rgb, isGrey: true }, truth };
}

export function benchMonoAccuracy({ width = 400, height = 300 } = {}) {
  const stack = resolveStack('soap-film');
  const table = stackLineTable(stack, LINE_NM, { angleRad: 0, maxThicknessNm: 2500 });
  const options = { stack, angleRad: 0, light: `line:${LINE_NM}`, thinBelowNm: 30, maxThicknessNm: 2500 };
  const scenarios = [];
  for (const bottomNm of [900, 1800]) {
    for (const noise of [0.002, 0.004, 0.008, 0.016]) {
      for (const vignette of [0, 0.25]) scenarios.push({ width, height, bottomNm, noise, vignette, seed: scenarios.length + 1 });
    }
  }
  return scenarios.map((scenario) => {
    const { photo, truth } = render(table, scenario);
    const t0 = performance.now();
    const result = mapLineIntensity(photo, options, table);
    const ms = performance.now() - t0;
    const thin = [];
    let ok = 0;
    let right = 0;
    let film = 0;
    for (let p = 0; p < truth.length; p++) {
      film++;
      if (result.status[p] !== 0) continue;
      ok++;
      const err = result.thicknessNm[p] - truth[p];
      if (truth[p] < 100) thin.push(Math.abs(err));
      if (branchOfThickness(table, result.thicknessNm[p]) === branchOfThickness(table, truth[p]) || Math.abs(err) < 15) right++;
    }
    thin.sort((a, b) => a - b);
    return {
      ...scenario,
      medianThinErrorNm: thin.length ? thin[thin.length >> 1] : null,
      orderShare: ok ? right / ok : null,
      estimateShare: ok / film,
      orderFrom: result.line.orderFrom,
      ms: Math.round(ms),
    };
  });
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  console.log('bottom_nm noise vignette | median_err_below_100nm order_right estimates | order_from ms');
  for (const r of benchMonoAccuracy()) {
    console.log(
      `${r.bottomNm} ${r.noise} ${r.vignette} | ${r.medianThinErrorNm?.toFixed(2)} ${(100 * r.orderShare).toFixed(2)}% ${(100 * r.estimateShare).toFixed(1)}% | ${r.orderFrom} ${r.ms}`,
    );
  }
}
