/**
 * Thin-region geometry of `lamella map` on drawn shapes of known area: ROUND TRIP THROUGH OUR
 * OWN FORWARD MODEL on an INVENTED scene. A soap film with a gentle gradient (380 → 520 nm, so the
 * photo holds enough colours to fit exposure, white balance and flare) carries two discs:
 *   A: radius 16 px, 20 nm (thin but measurable),
 *   B: radius 11 px, 4 nm (black film: too dark to measure, counted as thin).
 * Expected (geometry, no source needed): one region per disc, area ≈ πr² (within 4 %, and within
 * 3 % of the exact count of pixel centres inside the disc), centroid at the disc centre (0.5 px),
 * bounding box 2r wide (±2 px); disc A's minimum near 20 nm (±8), disc B's null (all too dark)
 * or below 10 nm.
 * `--pixel-size 2.5` (µm) must give area_um2 = area_px × 6.25 and area_mm2 = area_um2 / 10⁶.
 * Also findThinRegions on a hand-drawn status grid (no rendering): exact areas and centroids.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { findThinRegions } from '../src/map/thinRegions.js';
import { PixelStatus } from '../src/map/types.js';
import { sampleField, shoot, writePhoto } from './map-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-map-thin-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const W = 200;
const H = 150;
const DISCS = [
  { name: 'A', cx: 60.5, cy: 70.5, r: 16, nm: 20 },
  { name: 'B', cx: 140.5, cy: 80.5, r: 11, nm: 4 },
] as const;

/** Pixel (x, y) covers [x, x+1) × [y, y+1); its centre is inside a disc when within r. */
function discAt(x: number, y: number): (typeof DISCS)[number] | undefined {
  return DISCS.find((d) => (x + 0.5 - d.cx) ** 2 + (y + 0.5 - d.cy) ** 2 <= d.r * d.r);
}

function exactCount(r: number, cx: number, cy: number): number {
  let n = 0;
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) if ((x + 0.5 - cx) ** 2 + (y + 0.5 - cy) ** 2 <= r * r) n++;
  return n;
}

describe('thin regions on drawn discs', () => {
  it('one region per disc with the drawn area, centre and minimum; --pixel-size gives µm² and mm²', async () => {
    const truth = sampleField(W, H, (x, y) => discAt(x, y)?.nm ?? 380 + (140 * (x + y)) / (W + H));
    const photo = join(dir, 'discs.png');
    await writePhoto(photo, shoot(truth, W, H, { stack: 'soap-film', exposure: 6, flare: 0.01, noise: 0.002, seed: 4 }), W, H, 'png');
    const result = spawnSync(
      process.execPath,
      [join(root, 'bin', 'lamella.js'), 'map', photo, '--stack', 'soap-film', '--out', join(dir, 'out'), '--pixel-size', '2.5', '--no-report', '--json', '--quiet'],
      { encoding: 'utf8', cwd: root },
    );
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    const [record] = JSON.parse(result.stdout);
    expect(record.thin_regions).toHaveLength(2);
    for (const disc of DISCS) {
      const region = record.thin_regions.find(
        (r: { centroid_px: [number, number] }) => Math.hypot(r.centroid_px[0] - (disc.cx - 0.5), r.centroid_px[1] - (disc.cy - 0.5)) < 0.5,
      );
      expect(region, `region of disc ${disc.name}`).toBeDefined();
      const area = Math.PI * disc.r * disc.r;
      expect(Math.abs(region.area_px - area) / area).toBeLessThan(0.04);
      expect(Math.abs(region.area_px - exactCount(disc.r, disc.cx, disc.cy)) / area).toBeLessThan(0.03);
      expect(Math.abs(region.bbox_px[2] - 2 * disc.r)).toBeLessThanOrEqual(2);
      expect(Math.abs(region.bbox_px[3] - 2 * disc.r)).toBeLessThanOrEqual(2);
      expect(region.area_um2).toBeCloseTo(region.area_px * 6.25, 9);
      expect(region.area_mm2).toBeCloseTo(region.area_px * 6.25e-6, 15);
      if (disc.nm === 20) {
        expect(region.min_thickness_nm).not.toBeNull();
        expect(Math.abs(region.min_thickness_nm - 20)).toBeLessThan(8);
      } else if (region.min_thickness_nm !== null) {
        // Black film: mostly too dark; any pixel measured at all must be black-film thin.
        expect(region.min_thickness_nm).toBeLessThan(10);
      }
    }
  });

  it('findThinRegions on a hand-drawn grid: 8-connected components, exact areas and centroids, small specks ignored', () => {
    const w = 30;
    const h = 20;
    const thickness = new Float32Array(w * h).fill(400);
    const status = new Uint8Array(w * h);
    // A 5 × 4 block of 30 nm estimates at x 2..6, y 3..6.
    for (let y = 3; y <= 6; y++) for (let x = 2; x <= 6; x++) thickness[y * w + x] = 30;
    // A diagonal chain of too-dark pixels (8-connected only), 7 pixels from (15, 2) to (21, 8).
    for (let k = 0; k < 7; k++) {
      status[(2 + k) * w + 15 + k] = PixelStatus.dark;
      thickness[(2 + k) * w + 15 + k] = NaN;
    }
    // A 2-pixel speck (below the 5-pixel minimum), and an excluded thin-looking pixel.
    thickness[15 * w + 25] = 10;
    thickness[15 * w + 26] = 12;
    status[18 * w + 2] = PixelStatus.excluded;
    thickness[18 * w + 2] = NaN;
    const { regions, labels } = findThinRegions(thickness, status, w, h, 50, 3);
    expect(regions).toHaveLength(2);
    const block = regions.find((r) => r.areaPx === 20);
    const chain = regions.find((r) => r.areaPx === 7);
    if (!block || !chain) throw new Error(`regions of 20 and 7 px expected, found ${regions.map((r) => r.areaPx).join(', ')}`);
    expect(block.centroidX).toBeCloseTo(4, 12);
    expect(block.centroidY).toBeCloseTo(4.5, 12);
    expect(block.minThicknessNm).toBeCloseTo(30, 5);
    expect(block.bbox).toEqual([2, 3, 5, 4]);
    expect(block.areaUm2).toBeCloseTo(20 * 9, 12);
    expect(chain.centroidX).toBeCloseTo(18, 12);
    expect(chain.centroidY).toBeCloseTo(5, 12);
    expect(chain.minThicknessNm).toBeNull();
    expect(labels[15 * w + 25]).toBe(0);
    expect(labels[4 * w + 4]).toBe(block.id);
    expect(labels[5 * w + 18]).toBe(chain.id);
    // No threshold: no regions at all.
    expect(findThinRegions(thickness, status, w, h, null, null).regions).toHaveLength(0);
  });

  it('findThinRegions gives the regions and labels of a plain 8-connected flood fill on random grids (U, spiral and diagonal shapes, specks, ties)', () => {
    // A reference written here, independent of the code under test: flood fill from each
    // unlabelled thin pixel in raster order (common practice for connected components).
    const reference = (thickness: Float32Array, status: Uint8Array, w: number, h: number, thin: number, minArea: number) => {
      const isThin = (i: number) => status[i] === PixelStatus.dark || (status[i] === PixelStatus.ok && thickness[i] < thin);
      const labels = new Int32Array(w * h);
      const regions: Array<{ id: number; areaPx: number; centroidX: number; centroidY: number; minThicknessNm: number | null; bbox: number[] }> = [];
      let mark = -1;
      for (let seed = 0; seed < w * h; seed++) {
        if (labels[seed] !== 0 || !isThin(seed)) continue;
        const members: number[] = [seed];
        labels[seed] = mark;
        for (let k = 0; k < members.length; k++) {
          const x = members[k] % w;
          const y = Math.floor(members[k] / w);
          for (let dy = -1; dy <= 1; dy++) for (let dx = -1; dx <= 1; dx++) {
            const nx = x + dx;
            const ny = y + dy;
            if (nx < 0 || ny < 0 || nx >= w || ny >= h) continue;
            const n = ny * w + nx;
            if (labels[n] === 0 && isThin(n)) {
              labels[n] = mark;
              members.push(n);
            }
          }
        }
        if (members.length < minArea) {
          mark--;
          continue;
        }
        const id = regions.length + 1;
        let least = Infinity;
        const xs = members.map((i) => i % w);
        const ys = members.map((i) => Math.floor(i / w));
        for (const i of members) {
          labels[i] = id;
          if (status[i] === PixelStatus.ok && thickness[i] < least) least = thickness[i];
        }
        const x0 = Math.min(...xs);
        const y0 = Math.min(...ys);
        regions.push({
          id,
          areaPx: members.length,
          centroidX: xs.reduce((a, b) => a + b, 0) / members.length,
          centroidY: ys.reduce((a, b) => a + b, 0) / members.length,
          minThicknessNm: least === Infinity ? null : least,
          bbox: [x0, y0, Math.max(...xs) - x0 + 1, Math.max(...ys) - y0 + 1],
        });
      }
      for (let i = 0; i < labels.length; i++) if (labels[i] < 0) labels[i] = 0;
      return { regions, labels };
    };
    let seed = 12345;
    const random = () => ((seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32);
    for (let trial = 0; trial < 40; trial++) {
      const w = 1 + Math.floor(random() * 70);
      const h = 1 + Math.floor(random() * 50);
      const density = [0.1, 0.3, 0.5, 0.6, 0.8][trial % 5];
      const thickness = new Float32Array(w * h);
      const status = new Uint8Array(w * h);
      for (let i = 0; i < w * h; i++) {
        const u = random();
        status[i] = u < 0.05 ? PixelStatus.excluded : u < 0.1 ? PixelStatus.notFilm : u < 0.1 + density * 0.3 ? PixelStatus.dark : PixelStatus.ok;
        thickness[i] = status[i] === PixelStatus.ok ? (random() < density ? Math.round(random() * 20) : 80 + random() * 200) : NaN;
      }
      // A U shape and a spiral arm joined only at the bottom (one component found from two tops).
      if (w > 12 && h > 12) for (let y = 1; y < 11; y++) for (const x of [1, 10]) { status[y * w + x] = PixelStatus.dark; status[11 * w + x - 1 + ((y - 1) % 10)] = PixelStatus.dark; }
      for (const minArea of [1, 5]) {
        const got = findThinRegions(thickness, status, w, h, 50, null, minArea);
        const want = reference(thickness, status, w, h, 50, minArea);
        expect(got.regions.map(({ id, areaPx, centroidX, centroidY, minThicknessNm, bbox }) => ({ id, areaPx, centroidX, centroidY, minThicknessNm, bbox })), `trial ${trial} ${w}×${h}`).toEqual(want.regions);
        expect(Buffer.from(got.labels.buffer).equals(Buffer.from(want.labels.buffer)), `labels, trial ${trial}`).toBe(true);
      }
    }
  });
});
