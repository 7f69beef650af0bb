/**
 * The calibration file (src/calibrate/calibrationFile.ts): a record made by calibrateDecoded()
 * from an INVENTED step-wafer photo (rendered with our own forward model) is written as JSON and
 * read back by readCalibrationFile(); damaged files are refused with an InputError that names the
 * file and the field; loadCalibrationForRun() refuses a calibration made for another stack, light,
 * angle or camera white balance with a UsageError unless told to ignore the mismatch. Format checks only: no outside
 * numbers are involved.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { calibrateDecoded, type CalibrationRecord } from '../src/calibrate/calibrate.js';
import { CALIBRATION_VERSION, loadCalibrationForRun, readCalibrationFile } from '../src/calibrate/calibrationFile.js';
import { InputError, UsageError } from '../src/cli/errors.js';
import { resolveStack } from '../src/optics/index.js';
import { asDecoded, HEIGHT, shoot, stepKnownRegions, stepWafer, WIDTH } from './calibrate-scenes.js';

const dir = mkdtempSync(join(tmpdir(), 'lamella-calfile-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

let record: CalibrationRecord;
let good: string;

beforeAll(() => {
  const photo = asDecoded(shoot(stepWafer(), { light: 'F2', whiteBalanceLight: 'D65', exposure: 1.5, flare: 0.01, noiseSigma: 0.005, filmIndexScale: 1.02 }));
  record = calibrateDecoded(photo, WIDTH, HEIGHT, 'step.png', {
    stack: resolveStack('oxide-on-silicon'),
    stackSpec: 'oxide-on-silicon',
    light: 'F2',
    angleRad: 0,
    known: stepKnownRegions(),
    fit: ['exposure', 'flare', 'white-balance', 'index'],
  });
  good = join(dir, 'good.json');
  writeFileSync(good, JSON.stringify(record, null, 2));
});

/** Writes a variant of the good record; `edit` changes a deep copy. */
function variant(name: string, edit: (r: Record<string, any>) => void): string {
  const copy = JSON.parse(JSON.stringify(record)) as Record<string, any>;
  edit(copy);
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify(copy));
  return path;
}

function text(name: string, content: string): string {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
}

describe('calibration record shape (as documented in calibrationFile.ts)', () => {
  it('has the documented fields with numbers of the right kind', () => {
    expect(record.lamella_calibration).toBe(CALIBRATION_VERSION);
    expect(record.applies_to).toEqual({ stack: 'oxide-on-silicon', light: 'F2', white_balance_light: null, angle_deg: 0, camera: expect.any(String), camera_mode: 'srgb' });
    const fitted = record.fitted as Record<string, unknown>;
    expect(record.schema_version).toBe(1);
    expect(Object.keys(fitted).sort()).toEqual(['angle_deg', 'exposure', 'film_index_scale', 'flare', 'response', 'white_balance']);
    // Not asked for in --fit: no response (the identity).
    expect(fitted.response).toBeNull();
    expect(fitted.white_balance).toHaveLength(3);
    expect(fitted.flare).toHaveLength(3);
    expect(record.film_index_scale).toBe(fitted.film_index_scale);
    expect(record.fitted_parameters).toEqual(['exposure', 'flare', 'white-balance', 'index']);
    expect(Object.keys(record.uncertainty as object).sort()).toEqual(['exposure', 'flare_b', 'flare_g', 'flare_r', 'index_scale', 'wb_b', 'wb_r']);
    expect(record.known_regions).toHaveLength(6);
    expect(record.photo).toBe('step.png');
    expect(record.photo_size_px).toEqual([WIDTH, HEIGHT]);
    expect(Array.isArray(record.warnings)).toBe(true);
    expect(String(record.caution)).toMatch(/not a substitute for qualified metrology/);
  });
});

describe('readCalibrationFile()', () => {
  it('reads back what was written: exposure, gains, flare, index scale and angle', async () => {
    const read = await readCalibrationFile(good);
    const fitted = record.fitted as { exposure: number; white_balance: number[]; flare: number[]; film_index_scale: number; angle_deg: number };
    expect(read.exposureFixed).toEqual({ exposure: fitted.exposure, whiteBalance: fitted.white_balance, flare: fitted.flare, response: null, responseSource: 'identity' });
    expect(read.filmIndexScale).toBe(fitted.film_index_scale);
    expect(Math.abs((read.filmIndexScale as number) - 1.02)).toBeLessThan(0.003); // round trip of the rendered 1.02
    expect(read.angleDeg).toBe(0);
    expect(read.appliesTo.light).toBe('F2');
  });

  it('takes a missing index scale and angle as "not calibrated" (null)', async () => {
    const path = variant('no-index', (r) => {
      delete r.fitted.film_index_scale;
      delete r.film_index_scale;
      delete r.fitted.angle_deg;
    });
    const read = await readCalibrationFile(path);
    expect(read.filmIndexScale).toBeNull();
    expect(read.angleDeg).toBeNull();
  });

  it('reads a file written before the JSON convention (camelCase names, no schema_version) to the same values', async () => {
    // A calibration made by an earlier release must not be refused: the same numbers under the old names.
    const older = variant('older', (r) => {
      delete r.schema_version;
      const { white_balance, film_index_scale, angle_deg, ...rest } = r.fitted;
      r.fitted = { ...rest, whiteBalance: white_balance, filmIndexScale: film_index_scale, angleDeg: angle_deg };
      r.filmIndexScale = r.film_index_scale;
      delete r.film_index_scale;
    });
    const [now, then] = await Promise.all([readCalibrationFile(good), readCalibrationFile(older)]);
    expect(then.exposureFixed).toEqual(now.exposureFixed);
    expect(then.filmIndexScale).toBe(now.filmIndexScale);
    expect(then.angleDeg).toBe(now.angleDeg);
    // Its own names in its messages.
    const broken = variant('older-wb', (r) => {
      delete r.schema_version;
      const { white_balance: _w, ...rest } = r.fitted;
      r.fitted = { ...rest, whiteBalance: [1, 1] };
    });
    await expect(readCalibrationFile(broken)).rejects.toThrow(/fitted\.whiteBalance must be an array of 3 finite numbers > 0/);
  });

  const bad: Array<[string, () => string, RegExp]> = [
    ['a missing file', () => join(dir, 'nope.json'), /nope\.json: cannot read calibration file \(ENOENT\)$/],
    ['malformed JSON', () => text('broken.json', '{"fitted": {'), /broken\.json: calibration file is not valid JSON/],
    ['a JSON array', () => text('array.json', '[1, 2]'), /array\.json: calibration must be a JSON object$/],
    ['no "fitted"', () => variant('no-fitted', (r) => delete r.fitted), /no-fitted\.json: missing field "fitted"/],
    ['no "applies_to"', () => variant('no-applies', (r) => delete r.applies_to), /no-applies\.json: missing field "applies_to"/],
    ['no exposure', () => variant('no-exposure', (r) => delete r.fitted.exposure), /fitted\.exposure must be a finite number > 0, received nothing$/],
    ['an infinite exposure (1e999)', () => text('inf.json', JSON.stringify(record).replace(/"exposure":[^,}]+/, '"exposure":1e999')), /fitted\.exposure must be a finite number > 0, received Infinity$/],
    ['a negative exposure', () => variant('neg', (r) => (r.fitted.exposure = -2)), /fitted\.exposure must be a finite number > 0, received -2$/],
    ['an exposure given as text', () => variant('textexp', (r) => (r.fitted.exposure = '1.5')), /fitted\.exposure must be a finite number > 0, received "1\.5"$/],
    ['two white-balance gains', () => variant('wb2', (r) => (r.fitted.white_balance = [1, 1])), /fitted\.white_balance must be an array of 3 finite numbers > 0, received \[1,1\]$/],
    ['a zero white-balance gain', () => variant('wb0', (r) => (r.fitted.white_balance = [1, 1, 0])), /fitted\.white_balance\[2\] must be a finite number > 0, received 0$/],
    ['a null flare value', () => variant('flnull', (r) => (r.fitted.flare = [0, null, 0])), /fitted\.flare\[1\] must be a finite number, received null$/],
    ['an index scale of 0', () => variant('idx0', (r) => (r.fitted.film_index_scale = 0)), /fitted\.film_index_scale must be a finite number > 0, received 0$/],
  ];
  for (const [what, make, message] of bad) {
    it(`refuses ${what} with an InputError naming the file and the field`, async () => {
      const path = make();
      const error = await readCalibrationFile(path).then(
        () => null,
        (e: unknown) => e,
      );
      expect(error).toBeInstanceOf(InputError);
      expect((error as InputError).file).toBe(path);
      expect((error as Error).message.startsWith(`${path}: `)).toBe(true);
      expect((error as Error).message).toMatch(message);
      expect((error as Error).message).not.toContain('\n');
    });
  }
});

describe('loadCalibrationForRun()', () => {
  const run = { stack: 'oxide-on-silicon', light: 'F2', angleRad: 0, ignoreMismatch: false };

  it('accepts a calibration made for the same stack and light', async () => {
    const loaded = await loadCalibrationForRun(good, run);
    expect(loaded.exposureFixed.exposure).toBe((record.fitted as { exposure: number }).exposure);
  });

  it('refuses another light or stack with a one-line UsageError that names --calibration and the way out', async () => {
    await expect(loadCalibrationForRun(good, { ...run, light: 'F11' })).rejects.toThrow(UsageError);
    await expect(loadCalibrationForRun(good, { ...run, light: 'F11' })).rejects.toThrow(
      `--calibration ${good} was made for light 'F2', not 'F11' (add --ignore-calibration-mismatch to use it anyway)`,
    );
    await expect(loadCalibrationForRun(good, { ...run, stack: 'nitride-on-silicon' })).rejects.toThrow(
      `--calibration ${good} was made for stack 'oxide-on-silicon', not 'nitride-on-silicon' (add --ignore-calibration-mismatch to use it anyway)`,
    );
  });

  it('refuses a calibration made for another angle of incidence (more than 0.5° off), naming both angles', async () => {
    await expect(loadCalibrationForRun(good, { ...run, angleRad: (20 * Math.PI) / 180 })).rejects.toThrow(
      `--calibration ${good} was made for an angle of 0°, not 20° (give --angle 0, or add --ignore-calibration-mismatch to use it anyway)`,
    );
    await expect(loadCalibrationForRun(good, { ...run, angleRad: (0.4 * Math.PI) / 180 })).resolves.toBeTruthy();
  });

  it('with --fit …,angle, compares the fitted angle, not the starting one', async () => {
    const fitted = variant('fitted-angle', (r) => {
      r.fitted_parameters = [...r.fitted_parameters, 'angle'];
      r.fitted.angle_deg = 30.06;
    });
    await expect(loadCalibrationForRun(fitted, run)).rejects.toThrow(
      `--calibration ${fitted} was fitted at an angle of 30.06°, not 0° (give --angle 30.06, or add --ignore-calibration-mismatch to use it anyway)`,
    );
    await expect(loadCalibrationForRun(fitted, { ...run, angleRad: (30 * Math.PI) / 180 })).resolves.toBeTruthy();
  });

  it('refuses another camera white balance when the caller names its own (null = balanced for the light)', async () => {
    await expect(loadCalibrationForRun(good, { ...run, whiteBalanceLight: 'D65' })).rejects.toThrow(
      `--calibration ${good} was made with the camera white-balanced for the light itself, not 'D65' (give the same --white-balance, or add --ignore-calibration-mismatch to use it anyway)`,
    );
    await expect(loadCalibrationForRun(good, { ...run, whiteBalanceLight: null })).resolves.toBeTruthy();
    const daylight = variant('wb-d65', (r) => (r.applies_to.white_balance_light = 'D65'));
    await expect(loadCalibrationForRun(daylight, { ...run, whiteBalanceLight: null })).rejects.toThrow(/white-balanced for 'D65', not the light itself/);
    await expect(loadCalibrationForRun(daylight, { ...run, whiteBalanceLight: 'D65' })).resolves.toBeTruthy();
  });

  it('uses it anyway when asked to ignore the mismatch', async () => {
    const loaded = await loadCalibrationForRun(good, { ...run, light: 'F11', stack: 'nitride-on-silicon', angleRad: 1, whiteBalanceLight: 'A', ignoreMismatch: true });
    expect(loaded.filmIndexScale).toBe(record.film_index_scale);
  });
});
