/**
 * `lamella chart` end to end (spawns bin/lamella.js; the test script builds dist/ first).
 * Physics reference: WE12 in shared/refdata/worked_examples.csv — a quarter-wave soap film
 * reflects 4r²/(1+r²)² with r = (n−1)/(n+1) — with n(550 nm) of water from Daimon & Masumura
 * (2007), 1.33468 as listed in shared/refdata/optical_constants_reference.csv. Under a line light
 * at 550 nm our Y must equal 100·R exactly (Y_white = 100, CIE 15:2004 §7); the ambient is
 * standard air (Ciddor 1996), so r = (n − n_air)/(n + n_air).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { resolveLight } from '../src/colour/index.js';
import { resolveStack } from '../src/optics/index.js';
import { chartSwatchCentre } from '../src/render/chartSvg.js';
import { chartTable } from '../src/render/chartTable.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-chart-'));

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: root, maxBuffer: 64 << 20 });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

describe('lamella chart: tables', () => {
  it('CSV has the documented header and 1501 rows for the default 0–1500 nm at 1 nm', () => {
    const out = lamella('chart', '--stack', 'oxide-on-silicon', '--light', 'D65');
    expect(out.status).toBe(0);
    const lines = out.stdout.trim().split('\n');
    expect(lines[0]).toBe('thickness_nm,X,Y,Z,L,a,b,r8,g8,b8,hex,order');
    expect(lines).toHaveLength(1502);
    expect(lines[1].startsWith('0,')).toBe(true);
    expect(lines[1501].startsWith('1500,')).toBe(true);
    expect(lines[101].split(',')[10]).toMatch(/^#[0-9a-f]{6}$/);
  });
  it('quarter-wave soap film under line:550 has Y = 100·4r²/(1+r²)² (WE12, Daimon 2007 n = 1.33468), within 0.001', () => {
    const n = 1.33468;
    const d = 550 / (4 * n);
    // The preset's ambient is standard air: Ciddor 1996 (Appl. Opt. 35, 1566), n − 1 with L in µm.
    const L2 = 1 / 0.55 ** 2;
    const nAir = 1 + 0.05792105 / (238.0185 - L2) + 0.00167917 / (57.362 - L2);
    const r = (n - nAir) / (n + nAir);
    const expected = (100 * 4 * r * r) / (1 + r * r) ** 2;
    const out = lamella('chart', '--stack', 'soap-film', '--light', 'line:550', '--from', String(d), '--to', String(d + 1), '--step', '1');
    expect(out.status).toBe(0);
    const y = Number(out.stdout.trim().split('\n')[1].split(',')[2]);
    expect(Math.abs(y - expected)).toBeLessThan(0.001);
  });
  it('JSON carries the settings, the order boundaries and the rows', () => {
    const out = lamella('chart', '--stack', 'soap-film', '--light', 'A', '--to', '600', '--step', '2', '--format', 'json', '--observer', '1964');
    expect(out.status).toBe(0);
    const record = JSON.parse(out.stdout);
    expect(record.light).toBe('A');
    expect(record.observer).toBe('1964');
    expect(record.rows).toHaveLength(301);
    expect(record.schema_version).toBe(1);
    expect(Object.keys(record.rows[0])).toEqual(['thickness_nm', 'xyz', 'lab', 'srgb_8bit', 'hex', 'order']);
    expect(record.order_boundaries_nm.length).toBeGreaterThanOrEqual(2);
    // A free-standing film of zero thickness reflects nothing (common practice: the "black film").
    expect(record.rows[0].xyz[1]).toBeCloseTo(0, 10);
  });
  it('--out writes the file atomically and prints nothing', () => {
    const path = join(dir, 'chart.csv');
    const out = lamella('chart', '--stack', 'oxide-on-silicon', '--light', 'F2', '--to', '10', '--out', path);
    expect(out.status).toBe(0);
    expect(out.stdout).toBe('');
    expect(readFileSync(path, 'utf8').trim().split('\n')).toHaveLength(12);
  });
  it("--out - writes to standard output, the same bytes as no --out (common practice: '-' names standard output)", () => {
    const args = ['chart', '--stack', 'oxide-on-silicon', '--light', 'F2', '--to', '10'];
    const plain = lamella(...args);
    const dash = lamella(...args, '--out', '-');
    expect(dash.status, dash.stderr).toBe(0);
    expect(dash.stdout).toBe(plain.stdout);
    expect(dash.stdout.trim().split('\n')).toHaveLength(12);
    expect(existsSync(join(root, '-'))).toBe(false);
  });
});

describe('lamella chart: PNG', () => {
  it('writes a PNG whose swatches carry the table colours (within 2 codes at 5 thicknesses)', async () => {
    const path = join(dir, 'chart.png');
    const out = lamella('chart', '--stack', 'oxide-on-silicon', '--light', 'F11', '--format', 'png', '--out', path);
    expect(out.status).toBe(0);
    const { data, info } = await sharp(path).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    expect(info.width).toBe(1240);
    const table = chartTable({ stack: resolveStack('oxide-on-silicon'), light: resolveLight('F11'), angleRad: 0 });
    for (const thicknessNm of [20, 140, 333, 777, 1234]) {
      const { x, y } = chartSwatchCentre(table, 3, thicknessNm);
      const p = (Math.round(y) * info.width + Math.round(x)) * 3;
      for (let c = 0; c < 3; c++) expect(Math.abs(data[p + c] - table.srgb8[thicknessNm * 3 + c])).toBeLessThanOrEqual(2);
    }
  });
  it('--resolution 2 doubles the pixel size for print', async () => {
    const path = join(dir, 'chart2x.png');
    expect(lamella('chart', '--stack', 'soap-film', '--light', 'D65', '--to', '300', '--format', 'png', '--resolution', '2', '--out', path).status).toBe(0);
    expect((await sharp(path).metadata()).width).toBe(2480);
  });
  it('--format png without --out is a usage error', () => {
    const out = lamella('chart', '--stack', 'soap-film', '--light', 'D65', '--format', 'png');
    expect(out.status).toBe(2);
    expect(out.stderr).toContain('--format png needs --out FILE.png');
  });
});

describe('lamella chart: bad input', () => {
  it('an unknown light exits 2 and lists the valid names', () => {
    const out = lamella('chart', '--stack', 'soap-film', '--light', 'sunlight');
    expect(out.status).toBe(2);
    expect(out.stderr).toMatch(/--light: unknown light "sunlight"; light must be one of D65, D50, A, F2, F7, F11, LED-B1/);
  });
  it('an unknown observer exits 2 and lists the choices', () => {
    const out = lamella('chart', '--stack', 'soap-film', '--light', 'D65', '--observer', '2006');
    expect(out.status).toBe(2);
    expect(out.stderr).toMatch(/1931.*1964/);
  });
  it('a malformed SPD file exits 3 naming the file and line', () => {
    const path = join(dir, 'lamp.csv');
    writeFileSync(path, 'wavelength_nm,relative_spd\n380,1\n390,x\n780,1\n');
    const out = lamella('chart', '--stack', 'soap-film', '--light', path);
    expect(out.status).toBe(3);
    expect(out.stderr.trim()).toBe(`lamella: ${path}: line 3: column "relative_spd" must be a finite number, found text of 1 character`);
  });
  it('a bad thickness range exits 2', () => {
    const out = lamella('chart', '--stack', 'soap-film', '--light', 'D65', '--from', '500', '--to', '100');
    expect(out.status).toBe(2);
    expect(out.stderr).toMatch(/toNm must be a finite number > fromNm \(500\), received 100/);
  });
});
