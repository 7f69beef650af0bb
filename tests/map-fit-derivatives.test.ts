/**
 * The photo-formation fit's two shortcuts, each against its definition:
 * - predictionDerivatives(): the chain-rule derivatives of a predicted table colour equal central
 *   differences (Nocedal & Wright, Numerical Optimization, 2nd ed. 2006, §8.1) of the exact model,
 *   written here from the library's exact pieces (sRGB encode of IEC 61966-2-1:1999, the tone
 *   curve and saturation of ../src/colour/toneResponse.ts, JFIF Y′CbCr of ITU-T T.871);
 * - the fit's Jacobian (chain rule plus the refined thickness's own derivative) equals central
 *   differences of the very model the fit evaluates, on the demo's draining-film frame (an
 *   invented scene rendered by our own model and JPEG-encoded by sharp: a round trip);
 * - nearestEntry(): the same entry and distance as a scan over the whole table (lowest index among
 *   equal distances), including tables with many equal (clipped) colours and colours far from all.
 */
import { describe, expect, it } from 'vitest';
import { buildColourTable } from '../src/map/buildColourTable.js';
import { predictEncodedTable } from '../src/map/colourTable.js';
import { predictionDerivatives, PARAMETER_COUNT } from '../src/map/predictionDerivatives.js';
import { buildNearestEntryIndex, nearestEntry } from '../src/map/nearestEntry.js';
import { matchSpace, toMatchSpace } from '../src/map/matchSpace.js';
import { balanceTable } from '../src/colour/exposureModel.js';
import { encodeSrgb } from '../src/colour/srgb.js';
import { applyResponse } from '../src/colour/toneResponse.js';
import { distanceAt } from '../src/map/candidateCube.js';
import { resolveStack } from '../src/optics/index.js';
import type { ExposureParameters } from '../src/map/types.js';
import sharp from 'sharp';
import { renderDemoFrame } from '../scripts/make-demo.js';
import { readPhotoBytes } from '../src/io/readPhoto.js';
import { sampleFitPixels } from '../src/map/fitSamples.js';
import { chromaWeightFor } from '../src/map/matchSpace.js';
import { distinctColourCount, fitPhotoFormation, type InnerProblem } from '../src/map/fitPhotoFormation.js';
import { pixelsOfPhoto } from '../src/map/photoPixels.js';

const soap = buildColourTable({ stack: resolveStack('soap-film'), angleRad: 0, light: 'D65', maxThicknessNm: 2000 }).table;

/** Full parameter vector (exposure, red and blue gains, three flares, contrast, gamma, saturation) → parameters. */
function parametersOf(v: readonly number[], withResponse: boolean): ExposureParameters {
  return {
    exposure: v[0],
    whiteBalance: [v[1], 1, v[2]],
    flare: [v[3], v[4], v[5]],
    response: withResponse ? { contrast: v[6], gamma: v[7], saturation: v[8] } : null,
  };
}

/** The exact model for one entry (no tables): clamp, encode, response, matching space. */
function exactColour(index: number, v: readonly number[], encoding: 'srgb' | 'linear', withResponse: boolean, chromaWeight: number): number[] {
  const p = parametersOf(v, withResponse);
  const linear = Float64Array.from(soap.rgbLinear.subarray(index * 3, index * 3 + 3));
  const balanced = balanceTable(linear, p, encoding);
  const encoded = new Float32Array(3);
  for (let c = 0; c < 3; c++) {
    const value = Math.min(1, Math.max(0, balanced[c] + p.flare[c]));
    encoded[c] = encoding === 'srgb' ? encodeSrgb(value) : value;
  }
  const out = Float64Array.from(encoded);
  if (encoding === 'srgb') applyResponse(out, 1, p.response);
  const space = matchSpace(chromaWeight);
  if (!space) return Array.from(out);
  return Array.from(toMatchSpace(space, Float32Array.from(out), new Float32Array(3)));
}

describe('predictionDerivatives(): chain-rule derivatives of a predicted colour', () => {
  const cases = [
    { name: 'sRGB, picture style, JPEG 4:2:0 matching space', encoding: 'srgb', response: true, chroma: 0.7, v: [1.3, 1.08, 0.93, 0.01, 0.015, 0.02, 0.2, 1.1, 1.2] },
    { name: 'sRGB, identity response (where a response fit starts)', encoding: 'srgb', response: true, chroma: 1, v: [1.1, 0.95, 1.05, 0.005, 0.01, 0.0, 0, 1, 1] },
    { name: 'sRGB, no response', encoding: 'srgb', response: false, chroma: 1, v: [0.9, 1.02, 0.97, 0.02, 0.0, 0.01, 0, 1, 1] },
    { name: 'linear camera', encoding: 'linear', response: false, chroma: 1, v: [1.2, 1.1, 0.9, 0.01, 0.01, 0.01, 0, 1, 1] },
  ] as const;
  for (const c of cases) {
    it(`${c.name}: equal to central differences of the exact model`, () => {
      const table = { ...soap, encoding: c.encoding };
      const derivative = predictionDerivatives(table, parametersOf(c.v, c.response), matchSpace(c.chroma));
      const out = new Float64Array(3 * PARAMETER_COUNT);
      const columns = c.response ? PARAMETER_COUNT : 6;
      let compared = 0;
      for (const index of [3, 40, 120, 260, 410, 655, 900, 1400, 1990]) {
        // A colour held exactly at a clamp (0 or 1) sits on a kink, where no derivative exists.
        const plain = exactColour(index, c.v, c.encoding, c.response, 1);
        if (plain.some((x) => x <= 0 || x >= 1)) continue;
        derivative(index, out);
        for (let k = 0; k < columns; k++) {
          const h = 1e-6 * Math.max(1, Math.abs(c.v[k]));
          const up = exactColour(index, c.v.map((x, j) => (j === k ? x + h : x)), c.encoding, c.response, c.chroma);
          const down = exactColour(index, c.v.map((x, j) => (j === k ? x - h : x)), c.encoding, c.response, c.chroma);
          for (let ch = 0; ch < 3; ch++) {
            const numeric = (up[ch] - down[ch]) / (2 * h);
            // float32 colours: differences carry ~1e-7/h of rounding.
            expect(Math.abs(out[ch * PARAMETER_COUNT + k] - numeric), `entry ${index}, parameter ${k}, channel ${ch}`).toBeLessThan(0.03 + 1e-3 * Math.abs(numeric));
            compared++;
          }
        }
        if (!c.response) for (let k = 6; k < PARAMETER_COUNT; k++) for (let ch = 0; ch < 3; ch++) expect(out[ch * PARAMETER_COUNT + k]).toBe(0);
      }
      expect(compared).toBeGreaterThan(60);
    });
  }

  it('a channel clipped before the encode passes no derivative', () => {
    const v = [40, 1, 1, 0, 0, 0, 0, 1, 1];
    const derivative = predictionDerivatives(soap, parametersOf(v, false), null);
    const out = new Float64Array(3 * PARAMETER_COUNT);
    derivative(700, out);
    const predicted = predictEncodedTable(soap, parametersOf(v, false));
    for (let ch = 0; ch < 3; ch++) if (predicted[700 * 3 + ch] === 1) for (let k = 0; k < 6; k++) expect(out[ch * PARAMETER_COUNT + k]).toBe(0);
    expect(Array.from(predicted.subarray(2100, 2103))).toContain(1);
  });
});

describe('nearestEntry(): the nearest table entry, as a scan finds it', () => {
  /** A small deterministic generator (a linear congruential one; the test needs no quality). */
  function random(seed: number): () => number {
    let state = seed;
    return () => {
      state = (state * 1664525 + 1013904223) >>> 0;
      return state / 2 ** 32;
    };
  }
  function scan(predicted: Float32Array, count: number, stride: number, r: number, g: number, b: number): [number, number] {
    let best = Infinity;
    let bestIndex = -1;
    for (let t = 0; t < count; t += stride) {
      const d = distanceAt(predicted, t, r, g, b);
      if (d < best) {
        best = d;
        bestIndex = t;
      }
    }
    return [bestIndex, best];
  }
  const exposures = [0.3, 1, 7.5, 60];
  for (const exposure of exposures) {
    // Every entry (2,001: a grid of 32 cells per axis), every 3rd (667) and every 12th (167, as in
    // the fit's coarse exposure scan): the smaller ones on a grid of 12.
    for (const stride of [1, 3, 12]) {
      it(`exposure ${exposure}, every ${stride === 1 ? '' : `${stride}th `}entry: same index and distance for 3,000 colours`, () => {
        const predicted = predictEncodedTable(soap, { exposure, whiteBalance: [1, 1, 1], flare: [0.01, 0.01, 0.01] });
        const index = buildNearestEntryIndex(predicted, soap.count, stride);
        expect(index.cells).toBe(stride === 1 ? 32 : 12);
        const next = random(Math.round(exposure * 1000) + stride);
        const hit = { index: 0, distance: 0 };
        for (let q = 0; q < 3000; q++) {
          // A third near table colours (the usual query), a third the table's own colours (ties), a third anywhere.
          const kind = q % 3;
          const t = Math.floor(next() * soap.count);
          const r = kind === 2 ? next() : predicted[t * 3] + (kind === 0 ? (next() - 0.5) * 0.04 : 0);
          const g = kind === 2 ? next() : predicted[t * 3 + 1] + (kind === 0 ? (next() - 0.5) * 0.04 : 0);
          const b = kind === 2 ? next() : predicted[t * 3 + 2] + (kind === 0 ? (next() - 0.5) * 0.04 : 0);
          nearestEntry(index, r, g, b, hit);
          const [expectedIndex, expectedDistance] = scan(predicted, soap.count, stride, r, g, b);
          expect(hit.index, `query ${q}`).toBe(expectedIndex);
          expect(hit.distance).toBe(expectedDistance);
        }
      });
    }
  }
  it('a table of many equal (clipped) colours gives the lowest index among them', () => {
    const predicted = predictEncodedTable(soap, { exposure: 60, whiteBalance: [1, 1, 1], flare: [0, 0, 0] });
    const white = [];
    for (let t = 0; t < soap.count; t++) if (predicted[t * 3] === 1 && predicted[t * 3 + 1] === 1 && predicted[t * 3 + 2] === 1) white.push(t);
    expect(white.length).toBeGreaterThan(10);
    const hit = { index: 0, distance: 0 };
    nearestEntry(buildNearestEntryIndex(predicted, soap.count), 1, 1, 1, hit);
    expect(hit).toEqual({ index: white[0], distance: 0 });
  });
});

describe('the photo-formation fit: its Jacobian is the derivative of its model', () => {
  it('every column within 3 % of central differences (RMS over the smooth rows) at each inner fit\'s start, on a JPEG of the demo frame', async () => {
    const { image } = renderDemoFrame(8, 320, 240);
    const jpeg = await sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.byteLength), { raw: { width: 320, height: 240, channels: 3 } })
      .jpeg({ quality: 90, chromaSubsampling: '4:2:0' })
      .toBuffer();
    const photo = await readPhotoBytes(new Uint8Array(jpeg), 'demo.jpg');
    const pixels = photo.width * photo.height;
    const rgb = sampleFitPixels(pixelsOfPhoto(photo), new Uint8Array(pixels), pixels, 2000, false);
    const space = matchSpace(chromaWeightFor(photo.format, photo.chromaSubsampling))!;
    expect(space).not.toBeNull();
    const samples = toMatchSpace(space, rgb, new Float32Array(rgb.length));
    const problems: InnerProblem[] = [];
    const fit = fitPhotoFormation({
      table: soap,
      samples,
      samplesRgb: rgb,
      space,
      fitWhiteBalance: true,
      fitFlare: true,
      noiseSigma: 0.004,
      fitResponse: distinctColourCount(rgb) >= 48,
      onInnerProblem: (problem) => problems.push(problem),
    });
    expect(fit.parameters.exposure).toBeGreaterThan(0);
    expect(problems.length).toBeGreaterThan(0);
    for (const problem of problems) {
      const p0 = problem.initial;
      const columns = p0.length;
      const analytic = new Float64Array(problem.rows * columns);
      problem.jacobian(p0, analytic);
      for (let k = 0; k < columns; k++) {
        // Steps large against float32 rounding of the table. A row that is not smooth within the
        // step (its walk changed minimum: a jump; a channel at a clamp: a kink) shows as forward
        // and backward differences that disagree, and is left out.
        const h = 3e-4 * Math.max(1e-1, Math.abs(p0[k]));
        const at = (d: number): Float64Array => Float64Array.from(problem.evaluate(p0.map((v, j) => (j === k ? v + d : v))));
        const [up, here, down] = [at(h), at(0), at(-h)];
        let norm = 0;
        let error = 0;
        let jumps = 0;
        for (let row = 0; row < problem.rows; row++) {
          const numeric = (up[row] - down[row]) / (2 * h);
          const forward = (up[row] - here[row]) / h;
          const backward = (here[row] - down[row]) / h;
          if (Math.abs(forward - backward) > 0.05 * Math.max(Math.abs(forward), Math.abs(backward)) + 1e-2) {
            jumps++;
            continue;
          }
          norm += numeric * numeric;
          error += (numeric - analytic[row * columns + k]) ** 2;
        }
        expect(jumps).toBeLessThan(0.15 * problem.rows);
        expect(Math.sqrt(error / norm), `inner fit ${problems.indexOf(problem)}, column ${k}`).toBeLessThan(0.03);
      }
    }
  }, 60_000);
});
