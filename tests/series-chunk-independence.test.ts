/**
 * A series' results do not depend on how it is cut into chunks (issue 16 item 1). Within a chunk
 * each frame gets the previous frame's map, statuses and fit; a frame must still come out as its
 * own photo says (src/map/fitPhotoFormation.ts, `ownFit`). The data are the bundled demo
 * (fixtures/demo): INVENTED frames rendered by scripts/make-demo.js from a drainage scenario of our
 * own through our own forward model (src/render), so the truth check is a round trip through our
 * own renderer, scored with the generator's own truth field (`demoThickness`, reused, not copied)
 * against issue 16's targets: any two chunk sizes of 1, 5, 10 and 50 frames give frame means within
 * 0.5 nm and thin fractions within 0.002, and every frame's mean is within 2 nm of the true mean
 * over the same pixels (those with an estimate, as the statistic is defined: src/map/types.ts).
 * Runs the CLI from the compiled `dist/` (`npm test` builds first).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { readNpy } from '../src/io/decodeNpy.js';
import { PixelStatus } from '../src/map/types.js';
import { DEMO, demoThickness } from '../scripts/make-demo.js';

const bin = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
const demo = fileURLToPath(new URL('../fixtures/demo', import.meta.url));
const CHUNK_SIZES = [1, 5, 10, 50] as const;
let dir: string;

interface FrameResult {
  readonly stem: string;
  readonly meanNm: number;
  readonly thinFraction: number;
  /** The generator's true mean over the pixels this run gave an estimate. */
  readonly trueMeanNm: number;
}

const runs = new Map<number, FrameResult[]>();

async function frameResults(out: string): Promise<FrameResult[]> {
  const [head, ...rows] = (await readFile(join(out, 'series.csv'), 'utf8')).trim().split('\n');
  const columns = head.split(',');
  const frameColumn = columns.indexOf('frame');
  const meanColumn = columns.indexOf('mean_nm');
  const thinColumn = columns.indexOf('thin_fraction');
  expect(Math.min(frameColumn, meanColumn, thinColumn)).toBeGreaterThanOrEqual(0);
  const results: FrameResult[] = [];
  for (const row of rows) {
    const cells = row.split(',');
    const stem = cells[frameColumn].replace(/\.jpg$/, '');
    // film_001 is t = 0 s; the demo has DEMO.fps frames a second.
    const index = Number(stem.slice('film_'.length)) - 1;
    const status = (await readNpy(join(out, 'frames', `${stem}.status.npy`))).data as Uint8Array;
    const truth = demoThickness(index / DEMO.fps, 320, 240);
    let sum = 0;
    let count = 0;
    for (let p = 0; p < truth.length; p++) {
      if (status[p] !== PixelStatus.ok) continue;
      sum += truth[p];
      count++;
    }
    results.push({ stem, meanNm: Number(cells[meanColumn]), thinFraction: Number(cells[thinColumn]), trueMeanNm: sum / count });
  }
  return results;
}

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-chunks-'));
  for (const size of CHUNK_SIZES) {
    const out = join(dir, `chunk-${size}`);
    const r = spawnSync(
      process.execPath,
      [bin, 'series', demo, '--stack', 'soap-film', '--light', 'D65', '--fps', '2', '--thin-below', '100', '--chunk-frames', String(size), '--workers', '2', '--quiet', '--no-report', '--out', out],
      { encoding: 'utf8' },
    );
    if (r.status !== 0) throw new Error(`series --chunk-frames ${size} exited ${r.status}: ${r.stderr}`);
    runs.set(size, await frameResults(out));
  }
}, 900_000);

afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe('series results independent of the chunk size (demo; round trip through our own renderer)', () => {
  it('maps all 25 demo frames with every chunk size', () => {
    for (const size of CHUNK_SIZES) expect(runs.get(size)?.length, `--chunk-frames ${size}`).toBe(25);
  });

  it('any two chunk sizes (1, 5, 10, 50) give frame means within 0.5 nm and thin fractions within 0.002 (issue 16 targets)', () => {
    for (const a of CHUNK_SIZES) {
      for (const b of CHUNK_SIZES) {
        if (b <= a) continue;
        const ra = runs.get(a)!;
        const rb = runs.get(b)!;
        for (let i = 0; i < ra.length; i++) {
          expect(rb[i].stem).toBe(ra[i].stem);
          expect(Number.isFinite(ra[i].meanNm) && Number.isFinite(rb[i].meanNm), ra[i].stem).toBe(true);
          expect(Math.abs(ra[i].meanNm - rb[i].meanNm), `${ra[i].stem} mean, chunks of ${a} vs ${b}`).toBeLessThanOrEqual(0.5);
          expect(Math.abs(ra[i].thinFraction - rb[i].thinFraction), `${ra[i].stem} thin fraction, chunks of ${a} vs ${b}`).toBeLessThanOrEqual(0.002);
        }
      }
    }
  });

  it("every frame's mean is within 2 nm of the generator's true mean over the same pixels, with every chunk size (issue 16 target)", () => {
    for (const size of CHUNK_SIZES) {
      for (const frame of runs.get(size)!) {
        expect(Math.abs(frame.meanNm - frame.trueMeanNm), `${frame.stem}, chunks of ${size}`).toBeLessThanOrEqual(2);
      }
    }
  });
});
