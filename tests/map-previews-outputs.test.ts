// Previews no larger than 2,000 px on the long side, and `--outputs` choosing the files of a map.
// The 2,000 px limit and the output names are our own rules (README, "map"); the PNG pixel size
// is the pHYs chunk of the PNG specification (W3C 2003, section 11.3.5.3: pixels per unit, unit
// the metre), read back with sharp as dots per inch (1 in = 25.4 mm, common practice). The photo
// is an invented draining soap film rendered with our own forward model (a round trip).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { decodeNpy } from '../src/io/decodeNpy.js';
import { poolLabels, previewGrid, samplePreview } from '../src/map/previewGrid.js';
import { findThinRegions } from '../src/map/thinRegions.js';
import { mapPngLayout } from '../src/map/mapImages.js';
import { resolveLight } from '../src/colour/index.js';
import { resolveStack } from '../src/optics/index.js';
import { renderPhoto } from '../src/render/renderPhoto.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-previews-'));
const W = 2300;
const H = 400;

function lamella(...args: string[]) {
  return spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: dir });
}

beforeAll(async () => {
  const truth = new Float32Array(W * H);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) truth[y * W + x] = 150 + 600 * (x / W) + 20 * Math.sin(y / 23);
  const r = renderPhoto(truth, W, H, { stack: resolveStack('soap-film'), light: resolveLight('D65'), angleRad: 0, exposure: 7, flare: 0.01, noiseSigma: 0.002, seed: 5, bitDepth: 8 });
  await sharp(Buffer.from(r.data.buffer, r.data.byteOffset, r.data.byteLength), { raw: { width: W, height: H, channels: 3 } }).png().toFile(join(dir, 'wide.png'));
}, 60_000);

describe('the preview grid', () => {
  it('keeps photos up to 2,000 px on the long side; larger ones take the smallest whole step', () => {
    expect(previewGrid(2000, 1500)).toMatchObject({ step: 1, width: 2000, height: 1500, pixels: null });
    expect(previewGrid(4000, 3000)).toMatchObject({ step: 2, width: 2000, height: 1500 });
    const odd = previewGrid(4001, 10);
    expect(odd).toMatchObject({ step: 3, width: 1334, height: 4 });
    expect(odd.pixels?.[1]).toBe(3);
    expect(odd.pixels?.[1334]).toBe(3 * 4001);
  });

  it('point-samples values (each preview pixel one pixel of the map) and pools thin labels over each block', () => {
    const grid = previewGrid(6000, 6, 2000);
    const values = Float32Array.from({ length: 6000 * 6 }, (_, i) => i);
    const sampled = samplePreview(values, grid);
    expect(sampled[2]).toBe(6);
    const labels = new Int32Array(6000 * 6);
    labels[4 * 6000 + 3 * 17 + 2] = 9; // one pixel, inside block (17, 1) of step 3
    const pooled = poolLabels(labels, 6000, 6, grid);
    expect(pooled[1 * 2000 + 17]).toBe(9);
    expect(pooled.reduce((n, l) => n + (l ? 1 : 0), 0)).toBe(1);
  });

  it('pooling read only within the boxes of the regions gives the same preview labels as reading every block', () => {
    // Random blobs labelled by findThinRegions on odd sizes (blocks cut at the right and bottom edges).
    let seed = 77;
    const random = () => ((seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32);
    for (const [w, h, maxSide] of [[2501, 1203, 500], [4003, 7, 1000], [999, 1001, 250]] as const) {
      const thickness = new Float32Array(w * h).fill(500);
      const status = new Uint8Array(w * h);
      for (let blob = 0; blob < 40; blob++) {
        const cx = Math.floor(random() * w);
        const cy = Math.floor(random() * h);
        const r = 1 + random() * 12;
        for (let y = Math.max(0, Math.floor(cy - r)); y <= Math.min(h - 1, cy + r); y++) {
          for (let x = Math.max(0, Math.floor(cx - r)); x <= Math.min(w - 1, cx + r); x++) if ((x - cx) ** 2 + (y - cy) ** 2 <= r * r) thickness[y * w + x] = 20;
        }
      }
      const { labels, regions } = findThinRegions(thickness, status, w, h, 50, null);
      expect(regions.length).toBeGreaterThan(5);
      const grid = previewGrid(w, h, maxSide);
      const everyBlock = poolLabels(labels, w, h, grid);
      const withinBoxes = poolLabels(labels, w, h, grid, regions.map((region) => region.bbox));
      expect(Buffer.from(withinBoxes.buffer).equals(Buffer.from(everyBlock.buffer)), `${w}×${h}`).toBe(true);
      // A missing box loses its region's preview label: the boxes are what is read.
      const fewer = poolLabels(labels, w, h, grid, regions.slice(1).map((region) => region.bbox));
      expect(fewer.includes(regions[0].id)).toBe(false);
    }
  });
});

describe('lamella map: previews and --outputs', () => {
  it('a 2,300 px wide photo: map.png and flags.png drawn on every 2nd pixel, their pixel size doubled; the .npy at full size', async () => {
    const r = lamella('map', 'wide.png', '--stack', 'soap-film', '--light', 'D65', '--pixel-size', '5', '--out', 'all', '--quiet');
    expect(r.status, r.stderr).toBe(0);
    const flags = await sharp(join(dir, 'all', 'wide.flags.png')).metadata();
    expect([flags.width, flags.height]).toEqual([1150, 200]);
    const map = await sharp(join(dir, 'all', 'wide.map.png')).metadata();
    const layout = mapPngLayout(1150, 200, { notFilm: false, undecided: false });
    expect([map.width, map.height]).toEqual([layout.canvasWidth, layout.canvasHeight]);
    // 10 µm per preview pixel = 2540 dots per inch.
    expect(flags.density).toBeCloseTo(2540, 0);
    expect(map.density).toBeCloseTo(2540, 0);
    expect(decodeNpy(readFileSync(join(dir, 'all', 'wide.thickness.npy'))).shape).toEqual([H, W]);
  }, 120_000);

  it('--outputs npy,json writes those two files, and replaces the photo\'s earlier set as a whole', () => {
    const r = lamella('map', 'wide.png', '--stack', 'soap-film', '--light', 'D65', '--outputs', 'npy,json', '--out', 'all', '--quiet');
    expect(r.status, r.stderr).toBe(0);
    expect(readdirSync(join(dir, 'all')).sort()).toEqual(['wide.json', 'wide.thickness.npy']);
  }, 120_000);

  it('an unknown or empty output name is a usage error naming it and the choices (exit 2)', () => {
    for (const value of ['npy,pngs', '']) {
      const r = lamella('map', 'wide.png', '--stack', 'soap-film', '--light', 'D65', '--outputs', value, '--out', 'bad');
      expect(r.status).toBe(2);
      expect(r.stderr).toContain('--outputs');
      expect(r.stderr).toContain('npy, tif, confidence, status, map, flags, json, report');
    }
    expect(readdirSync(dir)).not.toContain('bad');
  }, 60_000);
});
