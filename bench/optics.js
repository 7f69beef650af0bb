// Benchmark of the optics engine: filmSpectra() for 401 wavelengths × 8,000 thicknesses per preset.
// Run after building: `node bench/optics.js` (or through bench/run.js, which calls benchOptics()).
import { fileURLToPath } from 'node:url';
import { filmSpectra } from '../dist/optics/filmSpectra.js';
import { listStackPresetNames, presetStack } from '../dist/optics/presets.js';

/**
 * Times filmSpectra() on the 380–780 nm step 1 grid and 0–1999.75 nm thicknesses (step 0.25 nm),
 * unpolarised light at 20°. Returns { wavelengths, thicknesses, results: [{ preset, ms }] } with the
 * best of `repeats` runs (after one warm-up run).
 */
export function benchOptics({ repeats = 3 } = {}) {
  const wavelengthsNm = Float64Array.from({ length: 401 }, (_, i) => 380 + i);
  const thicknessesNm = Float64Array.from({ length: 8000 }, (_, i) => i * 0.25);
  const grid = { wavelengthsNm, thicknessesNm, angleRad: (20 * Math.PI) / 180, polarisation: 'mixed' };
  const results = [];
  for (const preset of listStackPresetNames()) {
    const stack = presetStack(preset);
    filmSpectra(stack, grid);
    let best = Number.POSITIVE_INFINITY;
    for (let r = 0; r < repeats; r++) {
      const t0 = performance.now();
      filmSpectra(stack, grid);
      best = Math.min(best, performance.now() - t0);
    }
    results.push({ preset, ms: Math.round(best * 10) / 10 });
  }
  return { wavelengths: wavelengthsNm.length, thicknesses: thicknessesNm.length, results };
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const { wavelengths, thicknesses, results } = benchOptics();
  for (const { preset, ms } of results) console.log(`filmSpectra ${preset} ${wavelengths}×${thicknesses}: ${ms} ms`);
}
