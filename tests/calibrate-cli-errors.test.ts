/**
 * Bad input to `lamella calibrate` and to `lamella map --calibration/--known` (spawns
 * bin/lamella.js; `npm test` builds dist/ first): one line on stderr that names the option or the
 * file, exit status 2 for a usage error and 3 for a file that cannot be used (our documented exit
 * statuses, src/cli/errors.ts; common practice for command-line tools), no stack trace, and no
 * calibration file written. The photo is a small uniform grey PNG (an invented test input); the
 * calibration files are damaged copies of a well-formed record.
 */
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { lamellaAsync } from './calibrate-scenes.js';

const dir = mkdtempSync(join(tmpdir(), 'lamella-cal-err-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// Written in the form of files made before the JSON convention (camelCase fitted names): still read.
const GOOD = {
  lamella_calibration: 1,
  applies_to: { stack: 'oxide-on-silicon', light: 'D65', white_balance_light: null, angle_deg: 0, camera: 'sRGB' },
  fitted: { exposure: 1.2, whiteBalance: [1.1, 1, 0.9], flare: [0.01, 0.01, 0.01], filmIndexScale: 1, angleDeg: 0 },
  filmIndexScale: 1,
};

beforeAll(async () => {
  const grey = Buffer.alloc(30 * 20 * 3, 128);
  await sharp(grey, { raw: { width: 30, height: 20, channels: 3 } }).png().toFile(join(dir, 'grey.png'));
  writeFileSync(join(dir, 'exists.json'), '{}\n');
  mkdirSync(join(dir, 'folder'));
  writeFileSync(join(dir, 'good.json'), JSON.stringify(GOOD));
  writeFileSync(join(dir, 'broken.json'), '{"fitted": {"exposure": 1.2,');
  const { fitted: _fitted, ...noFitted } = GOOD;
  writeFileSync(join(dir, 'no-fitted.json'), JSON.stringify(noFitted));
  writeFileSync(join(dir, 'infinite.json'), JSON.stringify(GOOD).replace('"exposure":1.2', '"exposure":1e999'));
  writeFileSync(join(dir, 'nan-flare.json'), JSON.stringify({ ...GOOD, fitted: { ...GOOD.fitted, flare: [0.01, 'NaN', 0.01] } }));
});

const CAL = ['calibrate', 'grey.png', '--stack', 'oxide-on-silicon', '--out', 'cal.json'];
const MAP = ['map', 'grey.png', '--stack', 'oxide-on-silicon', '--out', 'maps', '--no-report'];

interface Case {
  readonly name: string;
  readonly args: readonly string[];
  readonly status: 2 | 3;
  /** The whole line after "lamella: ". */
  readonly message: string | RegExp;
}

const CASES: Case[] = [
  { name: 'no --known', args: CAL, status: 2, message: '--known is required at least once: X,Y,W,H=NM (a rectangle of known thickness)' },
  { name: '--known rectangle outside the photo', args: [...CAL, '--known', '20,10,20,5=100'], status: 2, message: '--known 20,10,20,5=100: the rectangle lies outside the 30×20 photo' },
  { name: '--known rectangle of zero size', args: [...CAL, '--known', '5,5,0,4=100'], status: 2, message: '--known must be X,Y,W,H in pixels (whole numbers, W and H > 0), received "5,5,0,4"' },
  { name: '--known without a thickness', args: [...CAL, '--known', '5,5,4,4'], status: 2, message: '--known must be X,Y,W,H=NM (a rectangle in pixels and its known thickness in nm), received "5,5,4,4"' },
  { name: '--known with three numbers', args: [...CAL, '--known', '5,5,4=100'], status: 2, message: '--known must be X,Y,W,H in pixels (whole numbers, W and H > 0), received "5,5,4"' },
  { name: '--known with a word for a corner', args: [...CAL, '--known', 'left,5,4,4=100'], status: 2, message: '--known must be X,Y,W,H in pixels (whole numbers, W and H > 0), received "left,5,4,4"' },
  { name: '--known with a word for the thickness', args: [...CAL, '--known', '5,5,4,4=thin'], status: 2, message: '--known thickness must be a number of nm >= 0, received "thin"' },
  { name: '--known with a negative thickness', args: [...CAL, '--known', '5,5,4,4=-20'], status: 2, message: '--known thickness must be a number of nm >= 0, received "-20"' },
  { name: 'unknown --fit name', args: [...CAL, '--known', '5,5,4,4=100', '--fit', 'exposure,gamma'], status: 2, message: "--fit: unknown parameter 'gamma'; choose from exposure, flare, white-balance, index, angle, response" },
  { name: 'empty --fit', args: [...CAL, '--known', '5,5,4,4=100', '--fit', ','], status: 2, message: '--fit needs at least one of exposure, flare, white-balance, index, angle, response' },
  { name: '--out that exists, without --force', args: ['calibrate', 'grey.png', '--stack', 'oxide-on-silicon', '--known', '5,5,4,4=100', '--out', 'exists.json'], status: 3, message: 'exists.json: exists already; add --force to replace it' },
  { name: '--out that is a folder', args: ['calibrate', 'grey.png', '--stack', 'oxide-on-silicon', '--known', '5,5,4,4=100', '--out', 'folder', '--force'], status: 3, message: 'folder: --out is a folder; give a file name such as cal.json' },
  { name: '--out that is the photo', args: ['calibrate', 'grey.png', '--stack', 'oxide-on-silicon', '--known', '5,5,4,4=100', '--out', 'grey.png', '--force'], status: 2, message: 'grey.png: output would overwrite an input file (it is the input file grey.png); choose another output folder or name' },
  { name: 'a photo that is missing', args: ['calibrate', 'none.png', '--stack', 'oxide-on-silicon', '--known', '5,5,4,4=100', '--out', 'cal.json'], status: 3, message: 'none.png: file not found' },
  { name: 'map --calibration with malformed JSON', args: [...MAP, '--calibration', 'broken.json'], status: 3, message: /^broken\.json: calibration file is not valid JSON \(.+\)$/ },
  { name: 'map --calibration missing "fitted"', args: [...MAP, '--calibration', 'no-fitted.json'], status: 3, message: 'no-fitted.json: missing field "fitted" (an object with exposure, white_balance, flare)' },
  { name: 'map --calibration with an infinite exposure', args: [...MAP, '--calibration', 'infinite.json'], status: 3, message: 'infinite.json: fitted.exposure must be a finite number > 0, received Infinity' },
  { name: 'map --calibration with a non-number flare', args: [...MAP, '--calibration', 'nan-flare.json'], status: 3, message: 'nan-flare.json: fitted.flare[1] must be a finite number, received "NaN"' },
  { name: 'map --calibration that is missing', args: [...MAP, '--calibration', 'none.json'], status: 3, message: 'none.json: cannot read calibration file (ENOENT)' },
  { name: 'map with both --calibration and --known', args: [...MAP, '--calibration', 'good.json', '--known', '5,5,4,4=100'], status: 2, message: 'give either --known (calibrate on the photo) or --calibration (a calibration file), not both' },
  { name: 'map --known malformed', args: [...MAP, '--known', '5,5,4,4'], status: 2, message: '--known must be X,Y,W,H=NM (a rectangle in pixels and its known thickness in nm), received "5,5,4,4"' },
];

describe.concurrent('bad input: one line naming the option or file, exit 2 (usage) or 3 (file), no stack trace, no file written', () => {
  for (const c of CASES) {
    it(`${c.name} → exit ${c.status}`, async () => {
      const run = await lamellaAsync(dir, ...c.args);
      expect(run.status, run.stderr).toBe(c.status);
      const lines = run.stderr.split('\n').filter((line) => line.length > 0);
      expect(lines, run.stderr).toHaveLength(1);
      expect(lines[0].startsWith('lamella: ')).toBe(true);
      const message = lines[0].slice('lamella: '.length);
      if (typeof c.message === 'string') expect(message).toBe(c.message);
      else expect(message).toMatch(c.message);
      expect(run.stderr).not.toMatch(/\n\s+at /);
      expect(run.stdout).toBe('');
      expect(existsSync(join(dir, 'cal.json'))).toBe(false);
    });
  }

  it('map --known rectangle outside the photo: that photo fails (exit 3) with a line naming the photo and --known, then the count of failed photos', async () => {
    const run = await lamellaAsync(dir, ...MAP, '--known', '20,10,20,5=100');
    expect(run.status).toBe(3);
    expect(run.stderr).toBe('lamella: grey.png: --known 20,10,20,5=100: the rectangle lies outside the 30×20 photo\nlamella: 1 of 1 photo(s) failed\n');
  });
});
