/**
 * keepConsistentPixels(): the second look at poor colour matches (src/map/keepConsistent.ts).
 *
 * The first block checks the rule on drawn fields where the answer follows from its definition
 * (a least-squares plane through the well-matched neighbours; thresholds in order periods).
 * The second renders an invented thin-spot scene through our forward model (the model itself is
 * checked against outside references in the optics-* and colour-* tests), writes it as a 4:2:0
 * JPEG (common practice for cameras: colour at half resolution, so the rings around a thin spot
 * are colour mixtures) and checks that what the rule keeps is right against the known field.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { keepConsistentPixels } from '../src/map/keepConsistent.js';
import { mapPhotoFile } from '../src/map/mapPhoto.js';
import { PixelStatus } from '../src/map/types.js';
import { resolveStack } from '../src/optics/index.js';
import { sampleField, shoot, writePhoto } from './map-scenes.js';

const PERIOD = 200;

/** A 9 × 9 field t = 300 + gx·x + gy·y, all well matched except the centre, which is poor. */
function planeWithPoorCentre(gx: number, gy: number, centreNm: number) {
  const width = 9;
  const height = 9;
  const thicknessNm = new Float32Array(width * height);
  const status = new Uint8Array(width * height).fill(PixelStatus.ok);
  const confidence = new Float32Array(width * height).fill(0.9);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) thicknessNm[y * width + x] = 300 + gx * x + gy * y;
  const centre = 4 * width + 4;
  thicknessNm[centre] = centreNm;
  status[centre] = PixelStatus.ambiguous;
  confidence[centre] = 0.05;
  return { width, height, thicknessNm, status, confidence, centre, orderPeriodNm: PERIOD };
}

describe('keepConsistentPixels() on drawn fields (identities of the rule)', () => {
  it('keeps a poor match that lies on the plane of its neighbours, with its own (low) confidence', () => {
    const field = planeWithPoorCentre(6, -3, 300 + 6 * 4 - 3 * 4 + 1.5);
    expect(keepConsistentPixels(field)).toBe(1);
    expect(field.status[field.centre]).toBe(PixelStatus.ok);
    expect(field.thicknessNm[field.centre]).toBeCloseTo(313.5, 4);
    expect(field.confidence[field.centre]).toBeCloseTo(0.05, 6);
  });

  it('drops a poor match one order off the plane (NaN, confidence 0)', () => {
    const field = planeWithPoorCentre(6, -3, 312 + PERIOD);
    expect(keepConsistentPixels(field)).toBe(0);
    expect(field.status[field.centre]).toBe(PixelStatus.ambiguous);
    expect(Number.isNaN(field.thicknessNm[field.centre])).toBe(true);
    expect(field.confidence[field.centre]).toBe(0);
  });

  it('drops a poor match off the plane by more than max(3 × RMS, 0.01 period) = 2 nm here (exact plane)', () => {
    expect(keepConsistentPixels(planeWithPoorCentre(6, -3, 312 + 1.9))).toBe(1);
    expect(keepConsistentPixels(planeWithPoorCentre(6, -3, 312 + 2.1))).toBe(0);
  });

  it('drops poor matches where the field is steeper than 0.2 period per pixel (colours alias there)', () => {
    expect(keepConsistentPixels(planeWithPoorCentre(39, 0, 300 + 39 * 4))).toBe(1);
    expect(keepConsistentPixels(planeWithPoorCentre(41, 0, 300 + 41 * 4))).toBe(0);
  });

  it('drops poor matches whose neighbours do not lie on a plane (RMS above 0.04 period)', () => {
    const field = planeWithPoorCentre(0, 0, 300);
    // A checkerboard ±10 nm around 300: RMS ≈ 10 nm > 8 nm.
    for (let y = 0; y < field.height; y++) {
      for (let x = 0; x < field.width; x++) {
        const i = y * field.width + x;
        if (i !== field.centre) field.thicknessNm[i] = 300 + ((x + y) % 2 === 0 ? 10 : -10);
      }
    }
    expect(keepConsistentPixels(field)).toBe(0);
  });

  it('needs six well-matched neighbours; pixels kept in the same pass are not evidence', () => {
    const field = planeWithPoorCentre(2, 2, 316);
    // Leave five well-matched neighbours in the 5 × 5 window; make the rest poor but on the plane.
    let left = 0;
    for (let dy = -2; dy <= 2; dy++) {
      for (let dx = -2; dx <= 2; dx++) {
        const i = (4 + dy) * field.width + (4 + dx);
        if (i === field.centre) continue;
        if (left < 5 && Math.abs(dx) === 2) {
          left++;
          continue;
        }
        field.status[i] = PixelStatus.ambiguous;
      }
    }
    const before = Uint8Array.from(field.status);
    keepConsistentPixels(field);
    expect(field.status[field.centre]).toBe(PixelStatus.ambiguous);
    // The result does not depend on the pass order: the same field mirrored gives the mirror.
    const mirrored = { ...planeWithPoorCentre(2, 2, 316), status: mirror(before, field.width) };
    for (let y = 0; y < 9; y++) for (let x = 0; x < 9; x++) mirrored.thicknessNm[y * 9 + x] = 300 + 2 * (8 - x) + 2 * y;
    mirrored.thicknessNm[mirrored.centre] = 316;
    keepConsistentPixels(mirrored);
    expect(Array.from(mirrored.status)).toEqual(Array.from(mirror(field.status, field.width)));
  });

  it('leaves pixels without an estimate (NaN) and well-matched pixels alone', () => {
    const field = planeWithPoorCentre(1, 1, NaN);
    const copy = Float32Array.from(field.thicknessNm);
    expect(keepConsistentPixels(field)).toBe(0);
    expect(Array.from(field.thicknessNm)).toEqual(Array.from(copy));
  });
});

function mirror(values: Uint8Array, width: number): Uint8Array {
  const out = new Uint8Array(values.length);
  const height = values.length / width;
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) out[y * width + (width - 1 - x)] = values[y * width + x];
  return out;
}

describe('round trip: what the rule keeps is right, and it adds no thin region', () => {
  const dir = mkdtempSync(join(tmpdir(), 'lamella-keep-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const W = 200;
  const H = 150;
  // Invented scene: a film thickening downwards (300 → 900 nm) with two thin spots (down to
  // 15 nm) whose steep rings JPEG's half-resolution chroma turns into colour mixtures.
  const SPOTS = [
    [60, 60, 14],
    [140, 90, 16],
  ] as const;
  const field = (x: number, y: number): number => {
    let h = 300 + 4 * y + 0.5 * x;
    for (const [cx, cy, r] of SPOTS) h -= (h - 15) * Math.exp(-((x - cx) ** 2 + (y - cy) ** 2) / (r * r));
    return h;
  };

  for (const chroma of ['4:2:0', '4:4:4'] as const) {
    it(`JPEG ${chroma}: kept pixels are within a few nm of the truth, never an order off their neighbours, and add no thin region`, async () => {
      const truth = sampleField(W, H, field);
      const rgb = shoot(truth, W, H, { stack: 'soap-film', exposure: 7, flare: 0.01, noise: 0.003, seed: 11 });
      const path = join(dir, `spots-${chroma.replace(/:/g, '')}.jpg`);
      await writePhoto(path, rgb, W, H, 'jpeg', 90, chroma);
      const options = { stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', thinBelowNm: 50, maxThicknessNm: 2000 };
      const strict = await mapPhotoFile(path, { ...options, keepConsistent: false });
      const result = await mapPhotoFile(path, options);
      expect(strict.keptByNeighbours).toBe(0);
      const errors: number[] = [];
      let newSlips = 0;
      for (let i = 0; i < truth.length; i++) {
        if (result.status[i] === strict.status[i]) {
          // Everything else is the same map.
          if (result.status[i] === PixelStatus.ok) expect(result.thicknessNm[i]).toBe(strict.thicknessNm[i]);
          continue;
        }
        expect([strict.status[i], result.status[i]]).toEqual([PixelStatus.ambiguous, PixelStatus.ok]);
        const error = result.thicknessNm[i] - truth[i];
        errors.push(Math.abs(error));
        // Where the strict map is already an order off (the steep first-order rings of the
        // spots), a kept pixel follows its neighbours; it must never slip on its own.
        const x = i % W;
        const y = Math.floor(i / W);
        const around: number[] = [];
        for (let dy = -2; dy <= 2; dy++) {
          for (let dx = -2; dx <= 2; dx++) {
            const j = (y + dy) * W + (x + dx);
            if (x + dx < 0 || x + dx >= W || y + dy < 0 || y + dy >= H || strict.status[j] !== PixelStatus.ok) continue;
            around.push(strict.thicknessNm[j] - truth[j]);
          }
        }
        around.sort((p, q) => p - q);
        if (Math.abs(error - around[Math.floor(around.length / 2)]) > 50) newSlips++;
      }
      expect(errors.length).toBe(result.keptByNeighbours);
      expect(errors.length).toBeGreaterThan(50);
      errors.sort((a, b) => a - b);
      expect(errors[Math.floor(errors.length / 2)]).toBeLessThan(3);
      // At most 1 % of kept pixels more than 50 nm off (each of them following a wrong neighbourhood).
      expect(errors.filter((e) => e > 50).length).toBeLessThanOrEqual(Math.ceil(0.01 * errors.length));
      expect(newSlips).toBe(0);
      // The thin regions are those of the strict map (kept thin pixels may widen one a little).
      expect(result.thinRegions).toHaveLength(strict.thinRegions.length);
      for (const region of strict.thinRegions) {
        expect(result.thinRegions.some((r) => Math.hypot(r.centroidX - region.centroidX, r.centroidY - region.centroidY) < 1)).toBe(true);
      }
      for (const [cx, cy] of SPOTS) expect(result.thinRegions.some((r) => Math.hypot(r.centroidX - cx, r.centroidY - cy) < 3)).toBe(true);
    });
  }
});
