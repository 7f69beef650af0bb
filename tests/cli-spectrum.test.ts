/**
 * `lamella spectrum` end to end (spawns bin/lamella.js; the test script builds dist/ first).
 * Physics references: WE12 formula (shared/refdata/worked_examples.csv) with n(550 nm) of water
 * from Daimon & Masumura 2007 as listed in shared/refdata/optical_constants_reference.csv (1.33468);
 * WE08 for bare Si (Green 2008) at 632.8 nm.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = new URL('..', import.meta.url).pathname;

function lamella(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: root });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

function parseCsv(text: string): { header: string; rows: number[][] } {
  const lines = text.trim().split('\n');
  return { header: lines[0], rows: lines.slice(1).map((line) => line.split(',').map(Number)) };
}

describe('lamella spectrum: output', () => {
  it('prints the CSV header and 401 rows for the default 380–780 nm step 1 grid', () => {
    const out = lamella('spectrum', '--stack', 'soap-film', '--thickness', '250');
    expect(out.status).toBe(0);
    const { header, rows } = parseCsv(out.stdout);
    expect(header).toBe('wavelength_nm,reflectance,transmittance,absorptance');
    expect(rows).toHaveLength(401);
    expect(rows[0][0]).toBe(380);
    expect(rows[400][0]).toBe(780);
    for (const row of rows) {
      expect(row[1] + row[2] + row[3]).toBeCloseTo(1, 8);
      expect(row[3]).toBe(0); // water k = 0 in the Daimon 2007 model
    }
  });
  it('soap film at d = λ/(4n) reflects 4r²/(1+r²)² (WE12 formula) with n(550) = 1.33468 (Daimon 2007)', () => {
    const n = 1.33468;
    const d = 550 / (4 * n);
    const out = lamella('spectrum', '--stack', 'soap-film', '--thickness', String(d), '--from', '550', '--to', '550', '--step', '1');
    const { rows } = parseCsv(out.stdout);
    // the preset's ambient is standard air: Ciddor 1996 (Appl. Opt. 35, 1566) eq. for n - 1, L in µm
    const L2 = 1 / (0.55 * 0.55);
    const nAir = 1 + 0.05792105 / (238.0185 - L2) + 0.00167917 / (57.362 - L2);
    const r = (nAir - n) / (nAir + n);
    expect(Math.abs(rows[0][1] - (4 * r * r) / (1 + r * r) ** 2)).toBeLessThan(5e-6); // n printed to 5 decimals
  });
  it('oxide-on-silicon at zero thickness is bare Si: 34.77 % at 632.8 nm (WE08, Green 2008)', () => {
    const out = lamella('spectrum', '--stack', 'oxide-on-silicon', '--thickness', '0', '--from', '632.8', '--to', '632.8', '--step', '1', '--polarisation', 's');
    const { rows } = parseCsv(out.stdout);
    expect(rows[0][0]).toBe(632.8);
    expect(Math.abs(rows[0][1] * 100 - 34.77)).toBeLessThan(0.03); // ambient air index shifts it slightly
    // T is the power entering the semi-infinite substrate; the zero-thickness film absorbs nothing
    expect(rows[0][1] + rows[0][2]).toBeCloseTo(1, 9);
    expect(rows[0][3]).toBe(0);
  });
  it('grid points are from + i·step (no drift): 400 to 700 by 0.1 ends at exactly 700', () => {
    const { rows } = parseCsv(lamella('spectrum', '--stack', 'soap-film', '--thickness', '100', '--from', '400', '--to', '700', '--step', '0.1').stdout);
    expect(rows).toHaveLength(3001);
    expect(rows[3000][0]).toBe(700);
    expect(rows[1234][0]).toBe(523.4);
  });
  it("--out FILE writes the CSV there and prints nothing; --out - is standard output (common practice: '-' names standard output)", () => {
    const args = ['spectrum', '--stack', 'soap-film', '--thickness', '250', '--from', '500', '--to', '520', '--step', '10'];
    const plain = lamella(...args);
    const path = join(mkdtempSync(join(tmpdir(), 'lamella-spectrum-')), 'r.csv');
    const toFile = lamella(...args, '--out', path);
    expect(toFile.status, toFile.stderr).toBe(0);
    expect(toFile.stdout).toBe('');
    expect(readFileSync(path, 'utf8')).toBe(plain.stdout);
    const again = lamella(...args, '--out', path);
    expect(again.status).toBe(3);
    expect(again.stderr).toContain('exists already; add --force to replace it');
    const dash = lamella(...args, '--out', '-', '--json');
    expect(dash.status, dash.stderr).toBe(0);
    expect(JSON.parse(dash.stdout).wavelengths_nm).toEqual([500, 510, 520]);
    expect(existsSync(join(root, '-'))).toBe(false);
  });
  it('--json prints the settings and arrays', () => {
    const out = lamella('spectrum', '--stack', 'nitride-on-silicon', '--thickness', '80', '--angle', '30', '--polarisation', 'p', '--from', '500', '--to', '520', '--step', '10', '--json');
    expect(out.status).toBe(0);
    const record = JSON.parse(out.stdout);
    expect(record).toMatchObject({ schema_version: 1, stack: 'nitride-on-silicon', thickness_nm: 80, polarisation: 'p', substrate: 'si', wavelengths_nm: [500, 510, 520] });
    expect(record.angle_deg).toBeCloseTo(30, 12);
    expect(record.reflectance).toHaveLength(3);
    expect(record.absorptance).toHaveLength(3);
  });
  it('--film-index glycerol-water:20 changes the film index (Gupta 2022) and so the spectrum', () => {
    const base = parseCsv(lamella('spectrum', '--stack', 'soap-film', '--thickness', '300', '--from', '550', '--to', '550').stdout).rows[0][1];
    const glyc = parseCsv(lamella('spectrum', '--stack', 'soap-film', '--thickness', '300', '--from', '550', '--to', '550', '--film-index', 'glycerol-water:20').stdout).rows[0][1];
    const fixed = parseCsv(lamella('spectrum', '--stack', 'soap-film', '--thickness', '300', '--from', '550', '--to', '550', '--film-index', '1.3559').stdout).rows[0][1];
    expect(glyc).not.toBeCloseTo(base, 3);
    expect(glyc).toBeCloseTo(fixed, 2);
  });
});

describe('lamella spectrum: bad input gives one line, no stack trace, non-zero exit', () => {
  const cases: Array<[string, string[], number, RegExp]> = [
    ['unknown preset', ['--stack', 'soapfilm', '--thickness', '100'], 2, /unknown preset 'soapfilm'.*valid presets: soap-film, oxide-on-silicon, nitride-on-silicon/],
    ['unknown film material', ['--stack', 'soap-film', '--thickness', '100', '--film-index', 'honey'], 2, /unknown material 'honey'.*glycerol-water:<wt%>/],
    ['negative thickness', ['--stack', 'soap-film', '--thickness', '-5'], 2, /--thickness must be a finite number of nm >= 0, received -5/],
    ['non-finite thickness', ['--stack', 'soap-film', '--thickness', 'Infinity'], 2, /--thickness must be a finite number/],
    ['angle 90', ['--stack', 'soap-film', '--thickness', '100', '--angle', '90'], 2, /--angle must be a number of degrees in \[0, 90\), received 90/],
    ['negative angle', ['--stack', 'soap-film', '--thickness', '100', '--angle=-1'], 2, /--angle .* received -1/],
    ['wavelength outside a material range', ['--stack', 'oxide-on-silicon', '--thickness', '100', '--from', '200'], 2, /wavelength 200 nm is outside its valid range/],
    ['bad step', ['--stack', 'soap-film', '--thickness', '100', '--step', '0'], 2, /stepNm must be a finite number > 0, received 0/],
  ];
  for (const [what, args, status, message] of cases) {
    it(`${what}`, () => {
      const out = lamella('spectrum', ...args);
      expect(out.status).toBe(status);
      expect(out.stdout).toBe('');
      expect(out.stderr.trim().split('\n')).toHaveLength(1);
      expect(out.stderr).toMatch(message);
      expect(out.stderr).not.toMatch(/\n\s+at /);
    });
  }
  it('malformed stack file and material file: exit 3 naming the file and the field', () => {
    const dir = mkdtempSync(join(tmpdir(), 'lamella-cli-'));
    const stackPath = join(dir, 'stack.json');
    writeFileSync(stackPath, JSON.stringify({ ambient: 'air', layers: [{ material: { n: 1.4, k: -0.2 }, thicknessNm: 'film' }], substrate: 'air' }));
    let out = lamella('spectrum', '--stack', stackPath, '--thickness', '100');
    expect(out.status).toBe(3);
    expect(out.stderr).toMatch(new RegExp(`${stackPath.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: layers\\[0\\]\\.material\\.k must be a finite number >= 0, received -0\\.2`));
    const materialPath = join(dir, 'film.csv');
    writeFileSync(materialPath, 'wavelength_nm,n,k\n300,1.4,0\n900,1.4,-1\n');
    out = lamella('spectrum', '--stack', 'soap-film', '--film-index', materialPath, '--thickness', '100');
    expect(out.status).toBe(3);
    expect(out.stderr).toMatch(/film\.csv: line 3: k must be >= 0, received -1/);
    expect(out.stderr.trim().split('\n')).toHaveLength(1);
  });
  it('--extrapolate allows the range with a warning on stderr', () => {
    const out = lamella('spectrum', '--stack', 'oxide-on-silicon', '--thickness', '100', '--from', '200', '--to', '210', '--step', '10', '--extrapolate');
    expect(out.status).toBe(0);
    expect(out.stderr).toMatch(/warning: material air: extrapolating/);
    expect(parseCsv(out.stdout).rows).toHaveLength(2);
  });
});
