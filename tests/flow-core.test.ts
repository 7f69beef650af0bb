import { describe, expect, it } from 'vitest';
import { denseFlow } from '../src/flow/denseFlow.js';
import { angularErrorRad, directionErrorRad, endpointErrorPx, summariseFlowErrors } from '../src/flow/flowErrors.js';
import { interiorMask, rotation, translation } from './flow-scenes.js';

const DEG = Math.PI / 180;

describe('flow error measures (Baker et al. 2011, IJCV 92:1–31, section 4.1)', () => {
  it('endpoint error is the Euclidean distance of the flow vectors', () => {
    // (3, 4) against (0, 0): the 3-4-5 right triangle.
    expect(endpointErrorPx(3, 4, 0, 0)).toBeCloseTo(5, 12);
    expect(endpointErrorPx(1.5, -2, 1.5, -2)).toBe(0);
  });
  it('angular error is the angle between the space-time vectors (u, v, 1)', () => {
    // (1, 0, 1) against (0, 0, 1): 45° by construction; (1, 0, 1) against (0, 1, 1): 60°
    // (cos = 1 / (√2 · √2) = 1/2).
    expect(angularErrorRad(1, 0, 0, 0) / DEG).toBeCloseTo(45, 10);
    expect(angularErrorRad(1, 0, 0, 1) / DEG).toBeCloseTo(60, 10);
    expect(angularErrorRad(2, 3, 2, 3)).toBe(0);
    // The plain image-plane direction: (1, 0) against (0, 1) is 90°.
    expect(directionErrorRad(1, 0, 0, 1) / DEG).toBeCloseTo(90, 10);
  });
});

describe('dense flow on synthetic textured images with known motion', () => {
  const W = 160;
  const H = 120;
  // Checks from the issue: endpoint error ≤ 0.3 px per frame where textured, direction ≤ 5° above 1 px per frame.
  it('recovers a translation of a few px per frame', () => {
    const s = translation(W, H, 3.7, -2.2);
    const r = denseFlow({ data: s.first, width: W, height: H }, { data: s.second, width: W, height: H });
    const e = summariseFlowErrors(r.uPx, r.vPx, s.uTrue, s.vTrue, interiorMask(s, 12));
    expect(e.count).toBeGreaterThan(10000);
    expect(e.meanEndpointPx).toBeLessThan(0.3);
    expect(e.p95DirectionDeg).toBeLessThan(5);
  });
  it('recovers a translation of tens of px per frame through the pyramid', () => {
    const s = translation(W, H, 17.3, 11.9);
    const r = denseFlow({ data: s.first, width: W, height: H }, { data: s.second, width: W, height: H });
    const e = summariseFlowErrors(r.uPx, r.vPx, s.uTrue, s.vTrue, interiorMask(s, 12));
    expect(e.count).toBeGreaterThan(8000);
    expect(e.meanEndpointPx).toBeLessThan(0.3);
    expect(e.p95DirectionDeg).toBeLessThan(5);
    // Without the pyramid the same motion is out of reach (the check can fail).
    const flat = denseFlow({ data: s.first, width: W, height: H }, { data: s.second, width: W, height: H }, { maxLevels: 1 });
    expect(summariseFlowErrors(flat.uPx, flat.vPx, s.uTrue, s.vTrue, interiorMask(s, 12)).meanEndpointPx).toBeGreaterThan(1);
  });
  it('recovers a solid rotation (4° per frame about the centre)', () => {
    const s = rotation(W, H, 4 * DEG, 80, 60);
    const r = denseFlow({ data: s.first, width: W, height: H }, { data: s.second, width: W, height: H });
    const e = summariseFlowErrors(r.uPx, r.vPx, s.uTrue, s.vTrue, interiorMask(s, 12));
    expect(e.meanEndpointPx).toBeLessThan(0.3);
    expect(e.meanDirectionDeg).toBeLessThan(5);
  });
  it('separates a uniform thinning from the motion and reports it', () => {
    const s = translation(W, H, 2.5, 1.5, -6);
    const r = denseFlow({ data: s.first, width: W, height: H }, { data: s.second, width: W, height: H });
    const mask = interiorMask(s, 12);
    expect(summariseFlowErrors(r.uPx, r.vPx, s.uTrue, s.vTrue, mask).meanEndpointPx).toBeLessThan(0.3);
    let sum = 0;
    let n = 0;
    for (let i = 0; i < mask.length; i++) if (mask[i] && Number.isFinite(r.changeNm[i])) { sum += r.changeNm[i]; n++; }
    expect(n).toBeGreaterThan(8000);
    expect(sum / n).toBeCloseTo(-6, 0);
  });
  it('follows the texture through a thinning that varies smoothly over the film; without the thinning term it cannot', () => {
    // Thinning of 2.5–15 nm per frame, faster lower down and varying across (invented field).
    const s = translation(W, H, 3.2, 1.7);
    const lossNm = (x: number, y: number): number => 5 * (1 + y / H) * (1 + 0.5 * Math.sin(x / 40));
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) s.second[y * W + x] -= lossNm(x, y);
    const mask = interiorMask(s, 12);
    const r = denseFlow({ data: s.first, width: W, height: H }, { data: s.second, width: W, height: H });
    const e = summariseFlowErrors(r.uPx, r.vPx, s.uTrue, s.vTrue, mask);
    expect(e.count).toBeGreaterThan(10000);
    expect(e.meanEndpointPx).toBeLessThan(0.3);
    // The thinning found follows the motion: compare at the moved position.
    let err = 0;
    let n = 0;
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
      const i = y * W + x;
      if (mask[i] && Number.isFinite(r.changeNm[i])) { err += Math.abs(r.changeNm[i] + lossNm(x + 3.2, y + 1.7)); n++; }
    }
    expect(err / n).toBeLessThan(0.5);
    const plain = denseFlow({ data: s.first, width: W, height: H }, { data: s.second, width: W, height: H }, { thinning: false });
    expect(summariseFlowErrors(plain.uPx, plain.vPx, s.uTrue, s.vTrue, mask).meanEndpointPx).toBeGreaterThan(1);
  });
  it('gives low confidence where the thickness is featureless and NaN where it is unknown', () => {
    const s = translation(W, H, 2, 1);
    // A flat disc (no texture) in both frames, and a hole with no thickness.
    for (const grid of [s.first, s.second]) {
      for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
        if ((x - 50) ** 2 + (y - 60) ** 2 < 20 ** 2) grid[y * W + x] = 640;
        if (x >= 120 && x < 140 && y >= 20 && y < 40) grid[y * W + x] = NaN;
      }
    }
    const r = denseFlow({ data: s.first, width: W, height: H }, { data: s.second, width: W, height: H });
    expect(r.confidence[60 * W + 50]).toBeLessThan(0.2);
    expect(r.confidence[60 * W + 100]).toBeGreaterThan(0.9);
    expect(Number.isNaN(r.uPx[30 * W + 130])).toBe(true);
    expect(r.confidence[30 * W + 130]).toBe(0);
  });
});
