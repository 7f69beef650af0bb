/**
 * Fringe counting on small hand-built zone graphs (our own scenarios). The kinds of the extremes
 * of a free film alternate dark (h = 0), bright (λ/4n), dark (λ/2n), … (Airy formula; checked in
 * mono-scheludko.test.ts). The numbers checked are fringe orders counted on these invented graphs
 * (an identity of the counting rules, no outside reference needed).
 */
import { describe, expect, it } from 'vitest';
import type { FringeSegments } from '../src/mono/fringeSegments.js';
import { classifyLevels, segmentFringes, CLASS_BRIGHT, CLASS_DARK, CLASS_SLOPE } from '../src/mono/fringeSegments.js';
import { EXTREME_MIN } from '../src/mono/lineReflectanceTable.js';
import { solveZoneBranches } from '../src/mono/zoneBranches.js';

/** A graph with the given zone areas and bands [kind, zones…]. */
function graph(zoneArea: number[], bands: Array<[number, ...number[]]>): FringeSegments {
  const zoneBands: number[][] = zoneArea.map(() => []);
  bands.forEach(([, ...zones], b) => zones.forEach((z) => zoneBands[z].push(b)));
  return {
    zoneOf: new Int32Array(0),
    zoneArea: Int32Array.from(zoneArea),
    bandOf: new Int32Array(0),
    bandKind: Int8Array.from(bands.map(([kind]) => kind)),
    bandArea: Int32Array.from(bands.map(() => 10)),
    bandZones: bands.map(([, ...zones]) => zones),
    zoneBands,
  };
}

describe('solveZoneBranches()', () => {
  it('counts a chain bright, dark, bright from a seed on branch 0', () => {
    const seg = graph([100, 90, 80, 70], [[1, 0, 1], [-1, 1, 2], [1, 2, 3]]);
    const result = solveZoneBranches(seg, EXTREME_MIN, [{ zone: 0, branch: 0 }]);
    expect([...result.zoneBranch]).toEqual([0, 1, 2, 3]);
    expect(result.conflicts).toBe(0);
  });
  it('counts back down when the seed sits on a higher branch', () => {
    const seg = graph([100, 90, 80], [[-1, 0, 1], [1, 1, 2]]);
    // Zone 0 on branch 3 (bright below, dark above): its dark band leads up to 4, then bright to 5.
    const result = solveZoneBranches(seg, EXTREME_MIN, [{ zone: 0, branch: 3 }]);
    expect([...result.zoneBranch]).toEqual([3, 4, 5]);
  });
  it('keeps zones on both sides of a black film (the zero-thickness dark extreme) on branch 0', () => {
    const seg = graph([100, 90], [[-1, 0, 1]]);
    const result = solveZoneBranches(seg, EXTREME_MIN, [{ zone: 0, branch: 0 }]);
    expect([...result.zoneBranch]).toEqual([0, 0]);
  });
  it('flags the smaller zone of an inconsistent loop as ambiguous', () => {
    // bright 0–1, dark 1–2, bright 2–0: going round adds 3 branches, so the loop cannot close.
    const seg = graph([100, 90, 20], [[1, 0, 1], [-1, 1, 2], [1, 2, 0]]);
    const result = solveZoneBranches(seg, EXTREME_MIN, [{ zone: 0, branch: 0 }]);
    expect(result.conflicts).toBeGreaterThan(0);
    expect(result.zoneAmbiguous[2]).toBe(1);
    expect(result.zoneAmbiguous[0]).toBe(0);
  });
  it('without a seed puts the thinnest zone of a chain in the first order', () => {
    const seg = graph([50, 100, 80], [[1, 0, 1], [-1, 1, 2]]);
    const result = solveZoneBranches(seg, EXTREME_MIN, []);
    expect([...result.zoneBranch]).toEqual([0, 1, 2]);
    expect(result.unseededComponents).toBe(1);
  });
  it('reports a guessed direction when the reverse count fits as well', () => {
    const seg = graph([100, 90], [[1, 0, 1]]);
    const result = solveZoneBranches(seg, EXTREME_MIN, []);
    expect(result.guessedDirectionZones).toEqual([0]);
    // Tie broken towards the larger zone being thinner.
    expect([...result.zoneBranch]).toEqual([0, 1]);
  });
});

describe('segmentFringes()', () => {
  it('separates zones by a one-pixel diagonal band (8-connected bands, 4-connected zones)', () => {
    const w = 5;
    const h = 5;
    const u = new Float32Array(w * h).fill(0.5);
    for (let i = 0; i < 5; i++) u[i * w + (4 - i)] = 0.99; // anti-diagonal bright line
    const cls = classifyLevels(u, new Uint8Array(w * h).fill(1), 0.12);
    expect(cls[4]).toBe(CLASS_BRIGHT);
    expect(cls[0]).toBe(CLASS_SLOPE);
    const seg = segmentFringes(cls, w, h, 1);
    expect(seg.zoneArea.length).toBe(2);
    expect(seg.bandArea.length).toBe(1);
    expect(seg.bandZones[0].sort()).toEqual([0, 1]);
  });
  it('drops zones smaller than minZonePx from the graph', () => {
    const u = Float32Array.from([0.05, 0.05, 0.05, 0.05, 0.5, 0.05, 0.05, 0.05, 0.05]);
    const cls = classifyLevels(u, new Uint8Array(9).fill(1), 0.12);
    expect(cls[0]).toBe(CLASS_DARK);
    const seg = segmentFringes(cls, 3, 3, 2);
    expect(seg.zoneArea.length).toBe(0);
    expect(seg.zoneOf[4]).toBe(-1);
  });
});
