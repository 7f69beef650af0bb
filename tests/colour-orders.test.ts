import { describe, expect, it } from 'vitest';
import { resolveLight } from '../src/colour/index.js';
import { resolveStack } from '../src/optics/index.js';
import { chartTable } from '../src/render/chartTable.js';
import { orderBoundaries } from '../src/render/orderBoundaries.js';
import { nmPerChartRow } from '../src/render/chartSvg.js';

describe('orderBoundaries() (our rule: an order begins at each local minimum of Y)', () => {
  it('finds the minima of a sampled cosine exactly and numbers the orders', () => {
    const d = new Float64Array(1001).map((_, i) => i);
    const y = d.map((x) => 1 + Math.cos((2 * Math.PI * (x - 100)) / 300));
    const { order, boundariesNm } = orderBoundaries(d, y);
    expect(boundariesNm).toEqual([250, 550, 850]);
    expect(order[249]).toBe(1);
    expect(order[250]).toBe(2);
    expect(order[1000]).toBe(4);
  });
  it('ignores dips shallower than 0.5 % of the range of Y and keeps deeper ones', () => {
    const d = new Float64Array(101).map((_, i) => i);
    const y = new Float64Array(101).fill(1);
    y[0] = 0;
    y[100] = 2;
    y[50] = 0.999; // 0.05 % of the range: ignored
    y[70] = 0.9; // 5 %: kept
    expect(orderBoundaries(d, y).boundariesNm).toEqual([70]);
  });
  it('handles fewer than three samples', () => {
    expect(orderBoundaries(Float64Array.of(0, 1), Float64Array.of(1, 0)).boundariesNm).toEqual([]);
  });
});

describe('chartTable() order boundaries of a soap film', () => {
  // Reflection from a free-standing film is darkest where 2·n·d = m·λ (textbook thin-film
  // condition with one phase inversion; common practice). Under a line light at 550 nm the
  // minima of Y must sit at d = m · 550 / (2 · 1.33468) (Daimon & Masumura 2007 n at 550 nm, as
  // listed in shared/refdata/optical_constants_reference.csv), within the 0.5 nm step.
  it('under line:550 the boundaries are at m · 206.04 nm', () => {
    const table = chartTable({ stack: resolveStack('soap-film'), light: resolveLight('line:550'), angleRad: 0, fromNm: 0, toNm: 1000, stepNm: 0.5 });
    const period = 550 / (2 * 1.33468);
    expect(table.boundariesNm.length).toBe(4);
    table.boundariesNm.forEach((b, k) => expect(Math.abs(b - (k + 1) * period)).toBeLessThanOrEqual(0.5));
  });
  it("exposure 'auto' brings the brightest channel to full scale", () => {
    const table = chartTable({ stack: resolveStack('soap-film'), light: resolveLight('D65'), angleRad: 0, toNm: 600, exposure: 'auto' });
    expect(Math.max(...table.rgbLinear)).toBeCloseTo(1, 12);
    expect(table.exposure).toBeGreaterThan(3);
  });
});

describe('nmPerChartRow()', () => {
  it('gives at most 8 rows for common spans', () => {
    expect(nmPerChartRow(1500)).toBe(250);
    expect(nmPerChartRow(2000)).toBe(250);
    expect(nmPerChartRow(100)).toBe(20);
  });
});
