/**
 * `lamella flow` as a command: bad input (exit 3 naming the folder or file, exit 2 naming the
 * option), resume, shards + aggregation, and the pixel size. The series folders here are written
 * directly in the layout `lamella series` writes (series.json, series.csv, frames/<stem>.json and
 * .thickness.npy), holding invented textured grids moved by a known translation (./flow-scenes.ts);
 * the end-to-end path through `lamella series` is in flow-series.test.ts.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdir, mkdtemp, readFile, readdir, rm, stat, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { encodeNpy } from '../src/io/encodeNpy.js';
import { decodeNpy } from '../src/io/decodeNpy.js';
import { texture } from './flow-scenes.js';
import { flowFromSeries } from '../src/api/flowFromSeries.js';
import { readFileSync } from 'node:fs';
import { Ajv2020 } from 'ajv/dist/2020.js';

const root = new URL('..', import.meta.url).pathname;
const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
function schemaErrors(name: string, data: unknown): string[] {
  const validate = ajv.getSchema(`https://lamella.invalid/schemas/${name}.schema.json`) ?? ajv.compile(JSON.parse(readFileSync(join(root, 'schemas', `${name}.schema.json`), 'utf8')) as object);
  return validate(data) ? [] : (validate.errors ?? []).map((e) => `${e.instancePath} ${e.message ?? ''}`);
}

const bin = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
const W = 96;
const H = 72;
let dir: string;

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lamella-flow-cli-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  return spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8' });
}

/** A series folder of `count` frames moving by (u, v) px per frame at `fps`. */
async function seriesFolder(name: string, count: number, u: number, v: number, fps: number, sizes?: Array<[number, number]>, settings: Record<string, unknown> = {}): Promise<string> {
  const out = join(dir, name);
  await mkdir(join(out, 'frames'), { recursive: true });
  const tex = texture(3);
  const rows = ['frame,time_s,mean_nm'];
  for (let k = 0; k < count; k++) {
    const [w, h] = sizes?.[k] ?? [W, H];
    const grid = new Float32Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) grid[y * w + x] = tex(x - k * u, y - k * v) - 2 * k;
    const stem = `f${k + 1}`;
    await writeFile(join(out, 'frames', `${stem}.thickness.npy`), encodeNpy(grid, [h, w]));
    await writeFile(join(out, 'frames', `${stem}.json`), JSON.stringify({ format: 'lamella-series-frame', frame: `${stem}.png`, stem, settings_hash: `h${k}` }));
    rows.push(`${stem}.png,${(k / fps).toFixed(3)},600`);
  }
  await writeFile(join(out, 'series.csv'), `${rows.join('\n')}\n`);
  await writeFile(join(out, 'series.json'), JSON.stringify({ format: 'lamella-series', version: 1, schema_version: 1, settings: { thin_below_nm: 50, ...settings }, frames: { width: W, height: H } }));
  return out;
}

describe('lamella flow: bad input', () => {
  it('a folder that is not a series output: exit 3 naming it', async () => {
    const empty = join(dir, 'not-a-series');
    await mkdir(empty);
    const r = lamella('flow', empty, '--out', join(dir, 'o1'));
    expect(r.status).toBe(3);
    expect(r.stderr).toContain(`${empty}: not a lamella series output folder`);
  });
  it('a series with fewer than two frames: exit 3 naming it', async () => {
    const one = await seriesFolder('one', 1, 0, 0, 1);
    const r = lamella('flow', one, '--out', join(dir, 'o2'));
    expect(r.status).toBe(3);
    expect(r.stderr).toContain(`${one}: a series with 1 mapped frame(s): the flow needs at least two`);
  });
  it('frames of different sizes: exit 3 naming the frame', async () => {
    const mixed = await seriesFolder('mixed', 3, 1, 0, 1, [[W, H], [W, H], [W - 8, H]]);
    const r = lamella('flow', mixed, '--out', join(dir, 'o3'));
    expect(r.status).toBe(3);
    expect(r.stderr).toContain(join(mixed, 'frames', 'f3.thickness.npy'));
    expect(r.stderr).toContain('frames of different sizes');
  });
  it('options out of range: exit 2 naming the option', async () => {
    const s = await seriesFolder('opts', 2, 1, 0, 1);
    for (const [option, value] of [['--pixel-size', '-1'], ['--min-confidence', '1.5'], ['--window', 'abc'], ['--shard', '3/2'], ['--thin-below', '0']]) {
      const r = lamella('flow', s, '--out', join(dir, 'o4'), option, value);
      expect(r.status, option).toBe(2);
      expect(r.stderr).toContain(option);
    }
  });
});

describe('lamella flow: outputs, resume, shards', () => {
  it('writes the documented outputs in px/s, and µm/s with --pixel-size', async () => {
    const s = await seriesFolder('units', 3, 3, -2, 5);
    const out = join(dir, 'units-flow');
    const r = lamella('flow', s, '--out', out, '--quiet');
    expect(r.status, r.stderr).toBe(0);
    const names = (await readdir(out)).sort();
    expect(names).toEqual(['f1.flow-confidence.npy', 'f1.flow.json', 'f1.flow.npy', 'f1.flow.png', 'f2.flow-confidence.npy', 'f2.flow.json', 'f2.flow.npy', 'f2.flow.png', 'flow.csv', 'flow.json', 'patches.csv']);
    const { data, shape } = decodeNpy(await readFile(join(out, 'f1.flow.npy')));
    expect(shape).toEqual([H, W, 2]);
    expect(data).toBeInstanceOf(Float32Array);
    // The middle: (3, −2) px per frame at 5 frames/s = (15, −10) px/s.
    const i = (H / 2) * W + W / 2;
    expect(data[2 * i]).toBeCloseTo(15, 0);
    expect(data[2 * i + 1]).toBeCloseTo(-10, 0);
    const csv = (await readFile(join(out, 'flow.csv'), 'utf8')).trim().split('\n');
    expect(csv[0]).toBe('frame,next_frame,time_s,dt_s,mean_speed_px_per_s,p95_speed_px_per_s,mean_vx_px_per_s,mean_up_px_per_s,mean_divergence_per_s,mean_vorticity_per_s,rms_vorticity_per_s,mean_thinning_nm_per_s,coverage');
    const row = csv[1].split(',');
    expect(Number(row[4])).toBeCloseTo(Math.hypot(15, 10), 0);
    expect(Number(row[7])).toBeCloseTo(10, 0); // up is positive: −10 px/s along the rows
    expect(Number(row[11])).toBeCloseTo(-10, 0); // −2 nm per frame at 5 frames/s
    // The records follow their JSON Schemas (draft 2020-12, validated by Ajv).
    expect(schemaErrors('flow', JSON.parse(await readFile(join(out, 'flow.json'), 'utf8')))).toEqual([]);
    expect(schemaErrors('flow-pair', JSON.parse(await readFile(join(out, 'f1.flow.json'), 'utf8')))).toEqual([]);
    expect(schemaErrors('flow-pair', { ...JSON.parse(await readFile(join(out, 'f1.flow.json'), 'utf8')), unit: 'mm/s' })).not.toEqual([]);
    const um = join(dir, 'units-flow-um');
    expect(lamella('flow', s, '--out', um, '--quiet', '--pixel-size', '2').status).toBe(0);
    const d2 = decodeNpy(await readFile(join(um, 'f1.flow.npy'))).data;
    expect(d2[2 * i]).toBeCloseTo(30, 0);
    expect((await readFile(join(um, 'flow.csv'), 'utf8')).split('\n')[0]).toContain('mean_speed_um_per_s');
  }, 60_000);

  it('a rerun skips pairs already done; new settings compute them again', async () => {
    const s = await seriesFolder('resume', 3, 2, 1, 2);
    const out = join(dir, 'resume-flow');
    expect(lamella('flow', s, '--out', out, '--quiet').status).toBe(0);
    const before = (await stat(join(out, 'f1.flow.npy'))).mtimeMs;
    const again = lamella('flow', s, '--out', out);
    expect(again.status).toBe(0);
    expect(again.stdout).toContain('0 frame pair(s) computed, 2 already done');
    expect((await stat(join(out, 'f1.flow.npy'))).mtimeMs).toBe(before);
    const changed = lamella('flow', s, '--out', out, '--window', '5');
    expect(changed.stdout).toContain('2 frame pair(s) computed, 0 already done');
  }, 60_000);

  it('two shards and an aggregation give what one run gives', async () => {
    const s = await seriesFolder('shards', 5, 1.5, 0.5, 4);
    const whole = join(dir, 'shards-whole');
    const parts = join(dir, 'shards-parts');
    expect(lamella('flow', s, '--out', whole, '--quiet').status).toBe(0);
    const first = lamella('flow', s, '--out', parts, '--shard', '1/2');
    expect(first.status).toBe(0);
    expect(first.stderr).toContain('2 of 4 frame pair(s) have no flow yet');
    expect(lamella('flow', s, '--out', parts, '--shard', '2/2', '--quiet').status).toBe(0);
    expect(lamella('flow', s, '--out', parts, '--aggregate-only', '--quiet').status).toBe(0);
    expect(await readFile(join(parts, 'flow.csv'), 'utf8')).toBe(await readFile(join(whole, 'flow.csv'), 'utf8'));
    expect(await readFile(join(parts, 'patches.csv'), 'utf8')).toBe(await readFile(join(whole, 'patches.csv'), 'utf8'));
  }, 60_000);

  it('stopped by its AbortSignal after the first pair: finished pairs kept, no aggregates; a rerun resumes', async () => {
    const s = await seriesFolder('abort', 4, 1, 1, 2);
    const out = join(dir, 'abort-flow');
    const controller = new AbortController();
    const stopped = await flowFromSeries(s, { outDir: out }, { signal: controller.signal, onProgress: () => controller.abort() });
    expect(stopped.interrupted).toBe(true);
    expect(stopped.computed).toBe(1);
    const names = await readdir(out);
    expect(names).toContain('f1.flow.json');
    expect(names).not.toContain('f2.flow.json');
    expect(names).not.toContain('flow.csv');
    const resumed = await flowFromSeries(s, { outDir: out });
    expect(resumed.interrupted).toBe(false);
    expect([resumed.skipped, resumed.computed]).toEqual([1, 2]);
    expect(resumed.pairs).toHaveLength(3);
  }, 60_000);
});
