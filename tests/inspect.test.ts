/**
 * Coating inspection (issue 19): spec and pass/fail, uniformity by formula, edge exclusion, scale
 * from the part, points and profiles, summary.csv and the folder index, bad input.
 *
 * Outside references: the uniformity figures are the usual definitions of coating practice
 * (common practice), checked against a direct computation and a hand-worked example; the
 * percentiles follow Hyndman & Fan (1996), type 7 (NumPy's default), worked by hand; the edge
 * band's distance is the exact Euclidean distance transform (Felzenszwalb & Huttenlocher 2012),
 * checked against brute force; a disc's area is πr². The rendered wafers are INVENTED scenes
 * (tests/inspect-scenes.ts), so thicknesses mapped from them are round trips through our own model.
 */
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeNpy } from '../src/io/decodeNpy.js';
import { insideEdgeBand, squaredDistanceToNonFilm } from '../src/inspect/edgeExclusion.js';
import { inspectMap } from '../src/inspect/inspectMap.js';
import { scaleFromPart } from '../src/inspect/partScale.js';
import { parsePassRule, parseSpec, specSearchRangeNm } from '../src/inspect/spec.js';
import { uniformityOf, valueStatistics } from '../src/inspect/uniformity.js';
import { PixelStatus } from '../src/map/types.js';
import { mapPngLayout } from '../src/map/mapImages.js';
import { coatingWithThickPatch, DISC, discOnChuck, beforeEtchNm } from './inspect-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const bin = join(root, 'bin', 'lamella.js');
const dir = mkdtempSync(join(tmpdir(), 'lamella-inspect-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Run { status: number | null; stdout: string; stderr: string }
const cli = (...args: string[]): Run => spawnSync(process.execPath, [bin, ...args], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
function cliAsync(...args: string[]): Promise<Run> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [bin, ...args], { cwd: dir });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}
const OXIDE_F11 = ['--stack', 'oxide-on-silicon', '--light', 'F11', '--threads', '1'];

/** A drawn frame: `film` pixels measured with `valueAt`, the rest not film. */
function drawn(width: number, height: number, film: (x: number, y: number) => boolean, valueAt: (x: number, y: number) => number) {
  const thicknessNm = new Float32Array(width * height).fill(Number.NaN);
  const status = new Uint8Array(width * height).fill(PixelStatus.notFilm);
  const confidence = new Float32Array(width * height);
  for (let y = 0, i = 0; y < height; y++) {
    for (let x = 0; x < width; x++, i++) {
      if (!film(x, y)) continue;
      status[i] = PixelStatus.ok;
      thicknessNm[i] = valueAt(x, y);
      confidence[i] = 1;
    }
  }
  return { width, height, thicknessNm, status, confidence, darkLimitNm: 0 };
}

describe('uniformity figures (common practice definitions) against a direct computation', () => {
  it('a hand-worked example: 98, 100, 102, 104 nm', () => {
    const s = valueStatistics(Float64Array.from([104, 98, 102, 100]));
    // mean 101; sample std √((9+1+1+9)/3) = √(20/3); p05 = 98 + 0.15·2 = 98.3 and p95 = 104 − 0.15·2 = 103.7
    // (Hyndman & Fan 1996 type 7: h = (n−1)·p, worked by hand); median 101.
    const u = uniformityOf(s);
    expect(u.range_over_twice_mean).toBeCloseTo(6 / 202, 12);
    expect(u.std_over_mean).toBeCloseTo(Math.sqrt(20 / 3) / 101, 12);
    expect(u.range_over_sum).toBeCloseTo(6 / 202, 12);
    expect(u.p90_span_over_median).toBeCloseTo((103.7 - 98.3) / 101, 12);
  });

  it('on drawn fields (a tilted plane with a ripple, a bowl with a dip) over the film area, equal to plain loops', () => {
    const fields = [
      drawn(120, 90, (x, y) => (x - 60) ** 2 + (y - 45) ** 2 < 40 ** 2, (x, y) => 300 + 0.4 * x - 0.2 * y + 3 * Math.sin(x / 5)),
      drawn(100, 100, (x, y) => x > 5 && y > 5 && x < 95 && y < 95, (x, y) => 80 + 0.01 * ((x - 50) ** 2 + (y - 50) ** 2) - (x > 40 && x < 60 && y > 40 && y < 60 ? 15 : 0)),
    ];
    for (const f of fields) {
      const result = inspectMap(f, {}, null);
      const v: number[] = [];
      for (let i = 0; i < f.status.length; i++) if (f.status[i] === PixelStatus.ok) v.push(f.thicknessNm[i]);
      v.sort((a, b) => a - b);
      const n = v.length;
      const mean = v.reduce((a, b) => a + b, 0) / n;
      const std = Math.sqrt(v.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1));
      const pct = (p: number): number => {
        const h = (n - 1) * p;
        const lo = Math.floor(h);
        return v[lo] + (h - lo) * (v[Math.min(n - 1, lo + 1)] - v[lo]);
      };
      const [min, max] = [v[0], v[n - 1]];
      expect(result.statistics.count).toBe(n);
      expect(result.uniformity.range_over_twice_mean).toBeCloseTo((max - min) / (2 * mean), 9);
      expect(result.uniformity.std_over_mean).toBeCloseTo(std / mean, 9);
      expect(result.uniformity.range_over_sum).toBeCloseTo((max - min) / (max + min), 9);
      expect(result.uniformity.p90_span_over_median).toBeCloseTo((pct(0.95) - pct(0.05)) / pct(0.5), 9);
    }
  });
});

describe('edge exclusion', () => {
  it('the distance to the outline equals brute force (exact Euclidean) on a drawn shape', () => {
    const f = drawn(40, 30, (x, y) => (x - 18) ** 2 / 200 + (y - 14) ** 2 / 80 < 1 && !(x > 20 && x < 24 && y > 8 && y < 12), () => 1);
    const d2 = squaredDistanceToNonFilm(f.status, 40, 30);
    for (let y = 0; y < 30; y++) {
      for (let x = 0; x < 40; x++) {
        let best = Infinity;
        for (let v = 0; v < 30; v++) for (let u = 0; u < 40; u++) if (f.status[v * 40 + u] !== PixelStatus.ok) best = Math.min(best, (u - x) ** 2 + (v - y) ** 2);
        expect(d2[y * 40 + x]).toBe(best);
      }
    }
  });

  it('a drawn disc of radius 100 px less a 10 px band keeps the area π·90² (±1 %)', () => {
    const f = drawn(260, 240, (x, y) => (x + 0.5 - 130) ** 2 + (y + 0.5 - 120) ** 2 <= 100 ** 2, () => 100);
    const kept = insideEdgeBand(f.status, 260, 240, 10).reduce((a, b) => a + b, 0);
    expect(kept / (Math.PI * 90 ** 2)).toBeGreaterThan(0.99);
    expect(kept / (Math.PI * 90 ** 2)).toBeLessThan(1.01);
    // Through inspectMap: 10 px is 2 mm at 200 µm a pixel; the statistics are over the kept pixels only.
    const ring = drawn(260, 240, (x, y) => (x + 0.5 - 130) ** 2 + (y + 0.5 - 120) ** 2 <= 100 ** 2, (x, y) => (Math.hypot(x + 0.5 - 130, y + 0.5 - 120) > 90 ? 150 : 100));
    const inspected = inspectMap(ring, { edgeExclusionMm: 2 }, 200);
    expect(inspected.edgeBandPx).toBeCloseTo(10, 9);
    expect(inspected.inspectedPx).toBe(kept);
    // The 150 nm ring (r > 90 px, 19 % of the disc) is all but gone: at most the pixels of r 90–90.5 px remain.
    expect(inspected.statistics.p95_nm).toBe(100);
    expect(inspected.statistics.mean_nm!).toBeLessThan(100 + 50 * 0.02);
    expect(inspectMap(ring, {}, 200).statistics.p95_nm).toBe(150);
  });
});

describe('scale from the part', () => {
  it('a drawn disc of 300 px diameter given as 150 mm: 500 µm a pixel (±1 %); a width of 120 px as 60 mm', () => {
    const disc = drawn(400, 360, (x, y) => (x + 0.5 - 200) ** 2 + (y + 0.5 - 180) ** 2 <= 150 ** 2, () => 100);
    const s = scaleFromPart(disc.status, 400, 360, { kind: 'diameter', sizeMm: 150 })!;
    expect(Math.abs(s.pixelSizeUm / 500 - 1)).toBeLessThan(0.01);
    const rect = drawn(200, 100, (x, y) => x >= 40 && x < 160 && y > 20 && y < 80, () => 100);
    expect(scaleFromPart(rect.status, 200, 100, { kind: 'width', sizeMm: 60 })!.pixelSizeUm).toBeCloseTo(500, 9);
  });
});

describe('spec and pass rule parsing', () => {
  it('NOMINAL±TOL, +-, %, MIN-MAX; rules', () => {
    expect(parseSpec('100±5')).toMatchObject({ minNm: 95, maxNm: 105, nominalNm: 100, toleranceNm: 5 });
    expect(parseSpec('100+-5 nm')).toMatchObject({ minNm: 95, maxNm: 105 });
    expect(parseSpec('200±2.5%')).toMatchObject({ minNm: 195, maxNm: 205 });
    expect(parseSpec('95-105')).toMatchObject({ minNm: 95, maxNm: 105, nominalNm: null });
    expect(parsePassRule('in-spec>=95%')).toEqual({ kind: 'in-spec', minShare: 0.95 });
    expect(parsePassRule('mean')).toEqual({ kind: 'mean' });
    expect(parsePassRule('all')).toEqual({ kind: 'all' });
    expect(() => parseSpec('100±-5')).toThrow(/--spec.*negative/);
    expect(() => parseSpec('abc')).toThrow(/--spec must be/);
    expect(() => parseSpec('105-95')).toThrow(/MIN must be below MAX/);
    expect(() => parsePassRule('in-spec>=120%')).toThrow(/--pass-if/);
    // The order search: the spec widened by its width each side, within 0..max thickness.
    expect(specSearchRangeNm(parseSpec('100±10'), 2000)).toEqual([70, 130]);
  });

  it('shares and verdicts on a drawn field with a known in-spec share (25 % of the square above spec)', () => {
    const f = drawn(100, 100, () => true, (x, y) => (x < 50 && y < 50 ? 130 : 100));
    const spec = parseSpec('100±10');
    const a = inspectMap(f, { spec }, null);
    expect(a.spec!.inSpec).toBe(0.75);
    expect(a.spec!.above).toBe(0.25);
    expect(a.verdict!.pass).toBe(false);
    expect(inspectMap(f, { spec, passIf: parsePassRule('in-spec>=75%') }, null).verdict!.pass).toBe(true);
    // mean 107.5 nm lies in 90–110: passes by the mean, fails by all.
    expect(inspectMap(f, { spec, passIf: { kind: 'mean' } }, null).verdict!.pass).toBe(true);
    expect(inspectMap(f, { spec, passIf: { kind: 'all' } }, null).verdict!.pass).toBe(false);
    expect([...a.outOfSpec!].reduce((s, v) => s + v, 0)).toBe(2500);
  });
});

describe('map --spec on a rendered wafer (invented scene; a round trip through our own model)', () => {
  let truthInSpec = 0;
  let run: Run;
  beforeAll(async () => {
    const scene = await discOnChuck('coated', coatingWithThickPatch);
    writeFileSync(join(dir, 'coated.jpg'), scene.photo);
    const other = await discOnChuck('bare', beforeEtchNm, 1904);
    writeFileSync(join(dir, 'bare.jpg'), other.photo);
    writeFileSync(join(dir, 'points.csv'), 'label,x_mm,y_mm\ncentre,0,0\npatch,27,45\nleft,-50,0\n');
    // The truth's share in spec over the film area less a 3 mm (6 px) band.
    let n = 0;
    for (let y = 0; y < scene.height; y++) {
      for (let x = 0; x < scene.width; x++) {
        if (Math.hypot(x + 0.5 - DISC.cx, y + 0.5 - DISC.cy) > DISC.radiusPx - 6) continue;
        n++;
        const t = coatingWithThickPatch(x + 0.5, y + 0.5);
        if (t >= 90 && t <= 110) truthInSpec++;
      }
    }
    truthInSpec /= n;
    run = await cliAsync('map', 'coated.jpg', ...OXIDE_F11, '--out', 'lot', '--spec', '100±10', '--part-diameter', '150', '--edge-exclusion', '3',
      '--points', 'points.csv', '--profile', '40,180,440,180', '--profile', '240,20,300,340', '--fail-if-out-of-spec');
  }, 120_000);

  it('share in spec within 1.5 points of the truth; FAIL by in-spec>=99 % in the summary line, JSON and exit status 1', () => {
    expect(run.status, run.stderr).toBe(1);
    expect(run.stdout).toMatch(/in spec \d+\.\d % of 100±10 nm: FAIL \(in-spec>=99%\)/);
    const record = JSON.parse(readFileSync(join(dir, 'lot', 'coated.json'), 'utf8'));
    const inspection = record.inspection;
    expect(Math.abs(inspection.spec.in_spec_fraction - truthInSpec)).toBeLessThan(0.015);
    expect(inspection.verdict).toMatchObject({ pass: false, rule: 'in-spec>=99%' });
    expect(record.settings.expect_nm).toEqual([70, 130]);
    expect(run.stderr).not.toMatch(/within --expect/);
    // Scale from the 150 mm disc of 300 px: 500 µm a pixel within 1 %; said in the JSON.
    expect(inspection.scale.source).toBe('part-diameter');
    expect(Math.abs(inspection.scale.pixel_size_um / 500 - 1)).toBeLessThan(0.01);
    expect(record.settings.pixel_size_um).toBe(inspection.scale.pixel_size_um);
    // The report shows the verdict and the formulas.
    const html = readFileSync(join(dir, 'lot', 'coated.report.html'), 'utf8');
    expect(html).toContain('id="inspection"');
    expect(html).toContain('(max-min)/(2*mean)');
    expect(html).toMatch(/FAIL/);
  });

  it('the record with an inspection block follows schemas/map-record.schema.json', () => {
    const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
    const validate = ajv.compile(JSON.parse(readFileSync(join(root, 'schemas', 'map-record.schema.json'), 'utf8')));
    const record = JSON.parse(readFileSync(join(dir, 'lot', 'coated.json'), 'utf8'));
    expect(validate(record), JSON.stringify(validate.errors)).toBe(true);
  });

  it('the map picture outlines the out-of-spec patch (white and black dashes on its edge)', async () => {
    const sharp = (await import('sharp')).default;
    // Pure white pixels inside the map itself (the canvas around it is white too): the outline's dashes.
    const whiteInMap = async (path: string): Promise<number> => {
      const { data, info } = await sharp(readFileSync(path)).raw().toBuffer({ resolveWithObject: true });
      const layout = mapPngLayout(480, 360, { notFilm: true, undecided: false });
      let white = 0;
      for (let y = layout.top; y < layout.top + 360; y++) {
        for (let x = layout.margin; x < layout.margin + 480; x++) {
          const i = (y * info.width + x) * info.channels;
          if (data[i] === 255 && data[i + 1] === 255 && data[i + 2] === 255) white++;
        }
      }
      return white;
    };
    const plain = cli('map', 'coated.jpg', ...OXIDE_F11, '--out', 'plain', '--outputs', 'map', '--expect', '70-130');
    expect(plain.status, plain.stderr).toBe(0);
    expect(await whiteInMap(join(dir, 'plain', 'coated.map.png'))).toBe(0);
    // The patch (80 px a side inside the 6 px edge band: an edge of ≈ 4 × 75 px, half of it white dashes).
    const white = await whiteInMap(join(dir, 'lot', 'coated.map.png'));
    expect(white).toBeGreaterThan(100);
    expect(white).toBeLessThan(300);
  }, 60_000);

  it('points and profiles equal the values of the .npy map', () => {
    const npy = decodeNpy(readFileSync(join(dir, 'lot', 'coated.thickness.npy')), 'npy');
    const [height, width] = npy.shape;
    const map = npy.data as Float32Array;
    const record = JSON.parse(readFileSync(join(dir, 'lot', 'coated.json'), 'utf8'));
    const [cx, cy] = record.inspection.centre_px;
    const px = record.inspection.scale.pixel_size_um;
    const rows = readFileSync(join(dir, 'lot', 'coated.points.csv'), 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
    expect(rows.map((r) => r[0])).toEqual(['"centre"', '"patch"', '"left"']);
    const radius = Math.max(1, 1000 / px);
    for (const r of rows) {
      const x = Number(r[1]);
      const y = Number(r[2]);
      const xMm = Number(r[3]);
      const yMm = Number(r[4]);
      expect(Math.abs(x - (cx + (xMm * 1000) / px))).toBeLessThan(0.02);
      expect(Math.abs(y - (cy - (yMm * 1000) / px))).toBeLessThan(0.02);
      let sum = 0;
      let n = 0;
      for (let v = Math.floor(y - radius - 1); v <= y + radius + 1; v++) {
        for (let u = Math.floor(x - radius - 1); u <= x + radius + 1; u++) {
          if ((u - x) ** 2 + (v - y) ** 2 > radius * radius) continue;
          const t = map[v * width + u];
          if (Number.isFinite(t)) { sum += t; n++; }
        }
      }
      expect(Number(r[5])).toBeCloseTo(sum / n, 1);
    }
    // The patch point reads the 125 nm patch, the centre the ≈ 100 nm coating (round trip: ±5 nm).
    expect(Math.abs(Number(rows[1][5]) - 125)).toBeLessThan(5);
    expect(Math.abs(Number(rows[0][5]) - 99)).toBeLessThan(5);
    for (const [k, line] of [[1, [40, 180, 440, 180]], [2, [240, 20, 300, 340]]] as const) {
      const samples = readFileSync(join(dir, 'lot', `coated.profile-${k}.csv`), 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
      const length = Math.hypot(line[2] - line[0], line[3] - line[1]);
      expect(samples.length).toBe(Math.ceil(length) + 1);
      expect(Number(samples.at(-1)![0])).toBeCloseTo(length, 2);
      for (const s of samples) {
        const v = map[Math.round(Number(s[3])) * width + Math.round(Number(s[2]))];
        if (Number.isFinite(v)) expect(Number(s[4])).toBeCloseTo(v, 1);
        else expect(s[4]).toBe('');
      }
      expect(height).toBe(360);
    }
  });

  it('a second run into the same folder adds to summary.csv and the index (rebuilt from the JSON records)', () => {
    const second = cli('map', 'bare.jpg', ...OXIDE_F11, '--out', 'lot', '--spec', '450-550', '--part-diameter', '150');
    expect(second.status, second.stderr).toBe(0);
    expect(second.stdout).toMatch(/PASS/);
    const csv = readFileSync(join(dir, 'lot', 'summary.csv'), 'utf8').trim().split('\n');
    expect(csv).toHaveLength(3);
    expect(csv[0]).toContain('uniformity (max-min)/(2*mean)');
    const header = csv[0].split(',');
    const rows = csv.slice(1).map((l) => l.split(','));
    expect(rows.map((r) => r[header.indexOf('photo')])).toEqual(['bare.jpg', 'coated.jpg']);
    expect(rows.map((r) => r[header.indexOf('verdict')])).toEqual(['pass', 'fail']);
    const index = readFileSync(join(dir, 'lot', 'report.html'), 'utf8');
    expect(index).toContain('href="./coated.report.html"');
    expect(index).toContain('href="./bare.report.html"');
    expect(index).toContain('<img src="./coated.map.png"');
    expect(index).toMatch(/1 pass, 1 fail/);
  }, 60_000);
});

describe('bad input (issue 19)', () => {
  it('exit 2 naming the option; a missing points file exit 3 naming it', () => {
    writeFileSync(join(dir, 'outside.csv'), 'x_px,y_px\n10,10\n5000,20\n');
    const cases: Array<[string[], number, RegExp]> = [
      [['--spec', 'about 100'], 2, /--spec/],
      [['--spec', '100±-5'], 2, /--spec.*negative/],
      [['--edge-exclusion', '3'], 2, /--edge-exclusion needs a scale/],
      [['--pass-if', 'mean'], 2, /--pass-if needs --spec/],
      [['--points', 'outside.csv'], 2, /--points outside\.csv: point P2 .* outside the 480×360 photo/],
      [['--profile', '0,0,900,10'], 2, /--profile 1 .* outside the 480×360 photo/],
      [['--profile', '1,2,3'], 2, /--profile must be X0,Y0,X1,Y1/],
      [['--points', 'missing.csv'], 3, /missing\.csv/],
    ];
    for (const [args, status, message] of cases) {
      const r = cli('map', 'bare.jpg', ...OXIDE_F11, '--out', 'bad', ...args);
      expect(r.status, `${args.join(' ')}: ${r.stderr}`).toBe(status);
      expect(r.stderr).toMatch(message);
    }
  }, 120_000);
});
