import { describe, expect, it } from 'vitest';
import { sharedPath } from '../src/data/sharedDir.js';
import { createDeltaE2000, deltaE2000, deltaE76, readNumericCsv } from '../src/colour/index.js';

// G. Sharma, W. Wu, E. N. Dalal, "The CIEDE2000 color-difference formula: implementation notes,
// supplementary test data, and mathematical observations", Color Res. Appl. 30(1), 21–30 (2005),
// doi:10.1002/col.20070, Table 1 (kL = kC = kH = 1). The table prints ΔE00 to 4 decimals, so we
// require agreement within 5e-5 (half a unit of the last printed digit) — tighter than 1e-4.
describe('deltaE2000() against Sharma, Wu & Dalal (2005) Table 1', () => {
  const table = readNumericCsv(sharedPath('cie', 'ciede2000_sharma2005.csv'), 8);
  const [pair, L1, a1, b1, L2, a2, b2, expected] = table.columns;
  it('has all 34 pairs', () => expect(pair.length).toBe(34));
  for (let i = 0; i < pair.length; i++) {
    it(`pair ${pair[i]}: ΔE00 = ${expected[i].toFixed(4)}`, () => {
      const value = deltaE2000([L1[i], a1[i], b1[i]], [L2[i], a2[i], b2[i]]);
      expect(Math.abs(value - expected[i])).toBeLessThan(5e-5);
    });
  }
  it('is symmetric in its arguments for every pair (Sharma et al. 2005 §3 note the formula is symmetric)', () => {
    for (let i = 0; i < pair.length; i++) {
      const forward = deltaE2000([L1[i], a1[i], b1[i]], [L2[i], a2[i], b2[i]]);
      const backward = deltaE2000([L2[i], a2[i], b2[i]], [L1[i], a1[i], b1[i]]);
      expect(Math.abs(forward - backward)).toBeLessThan(1e-12);
    }
  });
});

describe('createDeltaE2000() parametric factors', () => {
  it('kL = 2 halves a pure lightness difference centred on L = 50 (S_L = 1 there)', () => {
    const unit = deltaE2000([49, 0, 0], [51, 0, 0]);
    const half = createDeltaE2000({ kL: 2 })([49, 0, 0], [51, 0, 0]);
    expect(unit).toBeCloseTo(2, 12);
    expect(half).toBeCloseTo(1, 12);
  });
  it('rejects a non-positive factor and names it', () => {
    expect(() => createDeltaE2000({ kC: 0 })).toThrow(/kC must be a finite number > 0, received 0/);
  });
});

describe('deltaE76()', () => {
  it('is the Euclidean distance in L*a*b* (CIE 15:2004 §8.2.1.3)', () => {
    expect(deltaE76([50, 3, 4], [50, 0, 0])).toBe(5);
  });
});
