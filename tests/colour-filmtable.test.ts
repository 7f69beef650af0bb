import { describe, expect, it } from 'vitest';
import { buildCamera, filmColourTable, resolveLight } from '../src/colour/index.js';
import { resolveStack } from '../src/optics/index.js';

describe('filmColourTable()', () => {
  const camera = buildCamera({ light: resolveLight('D65') });
  it('a soap film of zero thickness reflects nothing: black (air | air, no interface)', () => {
    const rgb = filmColourTable(resolveStack('soap-film'), camera, Float64Array.of(0), 0);
    for (const v of rgb) expect(Math.abs(v)).toBeLessThan(1e-12);
  });
  it('returns nThickness × 3 values, and blocks of thicknesses give the same numbers as one by one', () => {
    const stack = resolveStack('oxide-on-silicon');
    const thicknesses = new Float64Array(1500).map((_, i) => i * 0.7);
    const all = filmColourTable(stack, camera, thicknesses, 0);
    expect(all.length).toBe(4500);
    for (const i of [0, 1023, 1024, 1499]) {
      const one = filmColourTable(stack, camera, Float64Array.of(thicknesses[i]), 0);
      for (let c = 0; c < 3; c++) expect(all[i * 3 + c]).toBeCloseTo(one[c], 12);
    }
  });
});
