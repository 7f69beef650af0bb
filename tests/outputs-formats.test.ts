/**
 * Outputs as other tools read them: the float TIFF's resolution and description, the PNG previews'
 * physical pixel size, every JSON record against its JSON Schema (schemas/, checked with the
 * general-purpose validator Ajv), the status map beside the confidence map, `map --json`'s one
 * shape, and `map`'s inputs (folders, glob patterns, names equal but for case).
 *
 * Sources: TIFF Revision 6.0 (Adobe Developers Association, 1992), Section 2 (IFD entries, types
 * ASCII 2, SHORT 3, RATIONAL 5) and Section 8 (ImageDescription 270; XResolution 282, YResolution
 * 283 as pixels per ResolutionUnit; ResolutionUnit 296: 1 none, 2 inch, 3 centimeter); PNG
 * Specification, W3C Recommendation 2003, section 5.3 (chunk layout and CRC-32 over type and
 * data) and 11.3.5.3 (pHYs: pixels per unit X, Y, unit specifier 1 = metre, before IDAT); JSON
 * Schema draft 2020-12 (json-schema.org) as implemented by Ajv. The image codec (libvips/libtiff
 * through sharp) reads the same tags back as a second, outside reader.
 *
 * The photos are INVENTED (our own step wafer, tests/calibrate-scenes.ts) rendered through our own
 * forward model; what is checked here is the files' form, not the thicknesses.
 */
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { crc32 } from 'node:zlib';
import sharp from 'sharp';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeNpy } from '../src/io/decodeNpy.js';
import { frameRecordFromJson, frameRecordToJson } from '../src/series/frameRecordJson.js';
import type { FrameRecord } from '../src/series/types.js';
import { lamella, lamellaAsync, shoot, stepKnownArgs, stepWafer, writePhoto } from './calibrate-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-outputs-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const STACK = ['--stack', 'oxide-on-silicon', '--light', 'D65'];
const demo = join(root, 'fixtures', 'demo');

const ajv = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true });
const compiled = new Map<string, ReturnType<typeof ajv.compile>>();
function validator(name: string): (data: unknown) => string[] {
  const validate = compiled.get(name) ?? ajv.compile(JSON.parse(readFileSync(join(root, 'schemas', `${name}.schema.json`), 'utf8')) as object);
  compiled.set(name, validate);
  return (data) => (validate(data) ? [] : (validate.errors ?? []).map((e) => `${e.instancePath} ${e.message ?? ''} ${JSON.stringify(e.params)}`));
}

beforeAll(async () => {
  const shot = { light: 'D65', exposure: 1.2, flare: 0.01, noiseSigma: 0.004 };
  await writePhoto(join(dir, 'step.png'), shoot(stepWafer(), { ...shot, seed: 1 }), 'png');
  await writePhoto(join(dir, 'wafer.png'), shoot(stepWafer(), { ...shot, seed: 2 }), 'png');
  const runs = await Promise.all([
    lamellaAsync(dir, 'map', 'step.png', ...STACK, '--pixel-size', '40', '--out', 'scaled', '--json'),
    lamellaAsync(dir, 'map', 'step.png', 'wafer.png', ...STACK, '--out', 'plain', '--json'),
  ]);
  for (const run of runs) if (run.status !== 0) throw new Error(`map failed in setup: ${run.stderr}`);
  writeFileSync(join(dir, 'scaled.stdout.json'), runs[0].stdout);
  writeFileSync(join(dir, 'plain.stdout.json'), runs[1].stdout);
}, 120_000);

/** The first IFD's entries of a classic little- or big-endian TIFF: tag → { type, count, values or text }. */
function tiffTags(bytes: Buffer): Map<number, { type: number; count: number; values: number[]; text?: string }> {
  const le = bytes.toString('latin1', 0, 2) === 'II';
  const u16 = (at: number): number => (le ? bytes.readUInt16LE(at) : bytes.readUInt16BE(at));
  const u32 = (at: number): number => (le ? bytes.readUInt32LE(at) : bytes.readUInt32BE(at));
  expect(u16(2)).toBe(42);
  const ifd = u32(4);
  const tags = new Map<number, { type: number; count: number; values: number[]; text?: string }>();
  for (let i = 0; i < u16(ifd); i++) {
    const at = ifd + 2 + i * 12;
    const [tag, type, count] = [u16(at), u16(at + 2), u32(at + 4)];
    const size = { 2: 1, 3: 2, 4: 4, 5: 8 }[type] ?? 0;
    const start = size * count <= 4 ? at + 8 : u32(at + 8);
    if (type === 2) tags.set(tag, { type, count, values: [], text: bytes.toString('latin1', start, start + count) });
    else if (type === 5) tags.set(tag, { type, count, values: [u32(start), u32(start + 4)] });
    else tags.set(tag, { type, count, values: [type === 3 ? u16(start) : u32(start)] });
  }
  return tags;
}

/** The chunks of a PNG (type, data, stored CRC). */
function pngChunks(bytes: Buffer): Array<{ type: string; data: Buffer; crc: number; crcOver: Buffer }> {
  expect(bytes.subarray(0, 8)).toEqual(Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]));
  const chunks = [];
  for (let at = 8; at + 12 <= bytes.length; ) {
    const length = bytes.readUInt32BE(at);
    chunks.push({ type: bytes.toString('latin1', at + 4, at + 8), data: bytes.subarray(at + 8, at + 8 + length), crc: bytes.readUInt32BE(at + 8 + length), crcOver: bytes.subarray(at + 4, at + 8 + length) });
    at += 12 + length;
  }
  return chunks;
}

describe('float TIFF: resolution and description (TIFF 6.0, Section 8)', () => {
  it('--pixel-size 40 µm: XResolution = YResolution = 250 pixels per centimetre, ResolutionUnit 3; the ImageDescription names quantity, unit and NaN', async () => {
    const path = join(dir, 'scaled', 'step.thickness.tif');
    const tags = tiffTags(readFileSync(path));
    // 1 cm = 10 000 µm: 10 000 / 40 = 250 pixels per centimetre.
    for (const tag of [282, 283]) {
      const { type, values } = tags.get(tag)!;
      expect(type).toBe(5);
      expect(values[0] / values[1]).toBe(250);
    }
    expect(tags.get(296)!.values[0]).toBe(3);
    const description = tags.get(270)!;
    expect(description.type).toBe(2);
    expect(description.text!.endsWith('\0')).toBe(true); // ASCII values end in NUL (Section 2)
    expect(description.text).toMatch(/quantity: film thickness; unit: nm;.*NaN: no estimate/);
    expect(description.text).toContain('pixel size 40 um');
    // An outside reader (libtiff through the image codec): 250 px/cm = 635 dpi.
    const meta = await sharp(path).metadata();
    expect(meta.resolutionUnit).toBe('cm');
    expect(meta.density).toBeCloseTo(635, 6);
  });

  it('without --pixel-size: resolution 1/1 with ResolutionUnit 1 (no absolute unit), and still the description', () => {
    const tags = tiffTags(readFileSync(join(dir, 'plain', 'step.thickness.tif')));
    expect(tags.get(282)!.values).toEqual([1, 1]);
    expect(tags.get(296)!.values[0]).toBe(1);
    expect(tags.get(270)!.text).toContain('pixel size not given');
  });
});

describe('PNG previews: pHYs (PNG specification 2003, 11.3.5.3)', () => {
  it('--pixel-size 40 µm: map and flags PNGs state 25 000 pixels per metre in x and y, unit metre, before IDAT, with a valid CRC', async () => {
    for (const name of ['step.map.png', 'step.flags.png']) {
      const path = join(dir, 'scaled', name);
      const chunks = pngChunks(readFileSync(path));
      const phys = chunks.filter((c) => c.type === 'pHYs');
      expect(phys).toHaveLength(1);
      expect(chunks.findIndex((c) => c.type === 'pHYs')).toBeLessThan(chunks.findIndex((c) => c.type === 'IDAT'));
      // 1 m / 40 µm = 25 000 pixels per metre; unit specifier 1 = metre.
      expect([phys[0].data.readUInt32BE(0), phys[0].data.readUInt32BE(4), phys[0].data[8]]).toEqual([25_000, 25_000, 1]);
      for (const chunk of chunks) expect(crc32(chunk.crcOver) >>> 0).toBe(chunk.crc);
      // An outside reader (libpng through the image codec): 25 000 px/m = 635 dpi.
      expect((await sharp(path).metadata()).density).toBeCloseTo(635, 6);
    }
  });

  it('without --pixel-size: no pHYs chunk at all (no claimed 25.4 dpi)', () => {
    for (const name of ['step.map.png', 'step.flags.png']) {
      const chunks = pngChunks(readFileSync(join(dir, 'plain', name)));
      expect(chunks.map((c) => c.type)).not.toContain('pHYs');
      expect(chunks.map((c) => c.type)).toContain('IDAT');
      for (const chunk of chunks) expect(crc32(chunk.crcOver) >>> 0).toBe(chunk.crc);
    }
  });
});

/** Every key path that is not snake_case (maps keyed by data, `input_files`, skipped). */
function notSnakeCase(value: unknown, path = ''): string[] {
  if (Array.isArray(value)) return value.flatMap((v, i) => notSnakeCase(v, `${path}[${i}]`));
  if (value === null || typeof value !== 'object') return [];
  return Object.entries(value as Record<string, unknown>).flatMap(([key, v]) => [
    ...(/^[a-z][a-z0-9_]*$/.test(key) ? [] : [`${path}.${key}`]),
    ...(key === 'input_files' ? [] : notSnakeCase(v, `${path}.${key}`)),
  ]);
}

describe('JSON records against their schemas (JSON Schema 2020-12, validated by Ajv)', () => {
  it('map: the <stem>.json files and `--json` (an array for one photo and for two) follow schemas/map-record.schema.json', () => {
    const check = validator('map-record');
    const one = JSON.parse(readFileSync(join(dir, 'scaled.stdout.json'), 'utf8'));
    const two = JSON.parse(readFileSync(join(dir, 'plain.stdout.json'), 'utf8'));
    expect(Array.isArray(one) && one.length).toBe(1);
    expect(Array.isArray(two) && two.length).toBe(2);
    const files = ['scaled/step.json', 'plain/step.json', 'plain/wafer.json'].map((f) => JSON.parse(readFileSync(join(dir, f), 'utf8')));
    expect(one[0]).toEqual(files[0]);
    for (const record of [...files, ...one, ...two]) {
      expect(check(record)).toEqual([]);
      expect(notSnakeCase(record)).toEqual([]);
      expect(record.schema_version).toBe(1);
    }
    expect(files[0].settings.pixel_size_um).toBe(40);
    expect(typeof files[0].settings.angle_deg).toBe('number');
  });

  it('the schemas are not empty promises: a camelCase key, a string angle or a missing schema_version are refused', () => {
    const check = validator('map-record');
    const record = JSON.parse(readFileSync(join(dir, 'plain', 'step.json'), 'utf8'));
    expect(check({ ...record, details: { ...record.details, poorMatch: 1 } }).join()).toMatch(/pattern/);
    expect(check({ ...record, settings: { ...record.settings, angle_deg: '0' } }).join()).toMatch(/angle_deg must be number/);
    const { schema_version: _v, ...older } = record;
    expect(check(older).join()).toMatch(/schema_version/);
  });

  it('series: series.json and every frames/<stem>.json follow their schemas; the angle is a number', () => {
    const run = lamella(dir, 'series', demo, '--stack', 'soap-film', '--light', 'D65', '--fps', '2', '--end', '1', '--workers', '1', '--no-report', '--quiet', '--out', 'series');
    expect(run.status, run.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(join(dir, 'series', 'series.json'), 'utf8'));
    expect(validator('series')(summary)).toEqual([]);
    expect(notSnakeCase(summary)).toEqual([]);
    expect(summary.settings.angle_deg).toBe(0);
    const checkFrame = validator('series-frame');
    const records = readdirSync(join(dir, 'series', 'frames')).filter((n) => n.endsWith('.json'));
    expect(records).toHaveLength(3);
    for (const name of records) {
      const record = JSON.parse(readFileSync(join(dir, 'series', 'frames', name), 'utf8'));
      expect(checkFrame(record)).toEqual([]);
      expect(notSnakeCase(record)).toEqual([]);
      // Both maps beside every frame record: status and confidence.
      for (const what of ['status', 'confidence', 'thickness']) expect(existsSync(join(dir, 'series', 'frames', name.replace(/\.json$/, `.${what}.npy`)))).toBe(true);
    }
    // A second run reads the snake_case records back and maps nothing again.
    const again = lamella(dir, 'series', demo, '--stack', 'soap-film', '--light', 'D65', '--fps', '2', '--end', '1', '--workers', '1', '--no-report', '--out', 'series');
    expect(again.status, again.stderr).toBe(0);
    expect(again.stdout).toContain("series: 0 frame(s) mapped, 3 already done, 0 failed");
  }, 120_000);

  it('calibrate: the calibration file follows schemas/calibration.schema.json', () => {
    const run = lamella(dir, 'calibrate', 'step.png', '--stack', 'oxide-on-silicon', '--light', 'D65', ...stepKnownArgs(), '--out', 'cal.json');
    expect(run.status, run.stderr).toBe(0);
    const cal = JSON.parse(readFileSync(join(dir, 'cal.json'), 'utf8'));
    expect(validator('calibration')(cal)).toEqual([]);
    expect(notSnakeCase(cal)).toEqual([]);
  });

  it('spectrum --json and chart --format json follow their schemas', () => {
    const spectrum = lamella(dir, 'spectrum', '--stack', 'oxide-on-silicon', '--thickness', '100', '--angle', '10', '--step', '20', '--json');
    expect(spectrum.status, spectrum.stderr).toBe(0);
    const chart = lamella(dir, 'chart', '--stack', 'soap-film', '--light', 'D65', '--to', '200', '--step', '5', '--format', 'json');
    expect(chart.status, chart.stderr).toBe(0);
    for (const [name, text] of [['spectrum', spectrum.stdout], ['chart', chart.stdout]] as const) {
      const record = JSON.parse(text);
      expect(validator(name)(record)).toEqual([]);
      expect(notSnakeCase(record)).toEqual([]);
    }
  });
});

describe('map writes a status map beside the confidence map', () => {
  it('<stem>.status.npy: uint8, the photo\'s shape, codes 0–7, counted as the record\'s pixel_counts (a round trip through our own outputs)', () => {
    const status = decodeNpy(readFileSync(join(dir, 'plain', 'step.status.npy')));
    const confidence = decodeNpy(readFileSync(join(dir, 'plain', 'step.confidence.npy')));
    const thickness = decodeNpy(readFileSync(join(dir, 'plain', 'step.thickness.npy')));
    expect(status.data).toBeInstanceOf(Uint8Array);
    expect(status.shape).toEqual(confidence.shape);
    expect(status.shape).toEqual([200, 300]);
    const record = JSON.parse(readFileSync(join(dir, 'plain', 'step.json'), 'utf8'));
    const names = ['ok', 'too_dark', 'too_thick', 'ambiguous', 'excluded', 'saturated', 'not_film', 'undecided'];
    const counts = new Array(8).fill(0);
    for (const code of status.data) counts[code]++;
    expect(Object.fromEntries(names.map((n, k) => [n, counts[k]]))).toEqual(record.pixel_counts);
    // Only status 0 carries a thickness.
    for (let i = 0; i < status.data.length; i++) expect(Number.isFinite(thickness.data[i])).toBe(status.data[i] === 0);
  });
});

describe('map inputs', () => {
  it('a glob pattern maps the photos it matches, as series does; a folder is no photo (exit 3) and leaves no --out folder', () => {
    mkdirSync(join(dir, 'shots'), { recursive: true });
    writeFileSync(join(dir, 'shots', 'a.png'), readFileSync(join(dir, 'step.png')));
    writeFileSync(join(dir, 'shots', 'b.png'), readFileSync(join(dir, 'wafer.png')));
    writeFileSync(join(dir, 'shots', 'notes.txt'), 'not a photo\n');
    const byGlob = lamella(dir, 'map', 'shots/*.png', ...STACK, '--out', 'by-glob', '--no-report', '--json');
    expect(byGlob.status, byGlob.stderr).toBe(0);
    expect(JSON.parse(byGlob.stdout).map((r: { photo: string }) => r.photo)).toEqual(['a.png', 'b.png']);
    const byFolder = lamella(dir, 'map', 'shots', ...STACK, '--out', 'by-folder', '--no-report', '--quiet');
    expect(byFolder.status).toBe(3);
    expect(byFolder.stderr).toContain('shots: is a folder');
    expect(existsSync(join(dir, 'by-folder'))).toBe(false);
    const none = lamella(dir, 'map', 'shots/*.jpg', ...STACK, '--out', 'by-nothing');
    expect(none.status).toBe(3);
    expect(none.stderr).toContain('matches no file');
    expect(existsSync(join(dir, 'by-nothing'))).toBe(false);
  }, 60_000);

  it('two photos whose names differ only in case are refused like equal names (exit 2), before any output', () => {
    mkdirSync(join(dir, 'upper'), { recursive: true });
    writeFileSync(join(dir, 'upper', 'STEP.PNG'), readFileSync(join(dir, 'step.png')));
    const run = lamella(dir, 'map', 'step.png', 'upper/STEP.PNG', ...STACK, '--out', 'case');
    expect(run.status).toBe(2);
    expect(run.stderr).toBe("lamella: two photos share the names 'step' and 'STEP' (equal but for case): their outputs would collide; map them into different --out folders\n");
    expect(existsSync(join(dir, 'case'))).toBe(false);
  });

  it('series refuses frames whose stems differ only in case (exit 2)', () => {
    mkdirSync(join(dir, 'frames-case'), { recursive: true });
    writeFileSync(join(dir, 'frames-case', 'f1.png'), readFileSync(join(dir, 'step.png')));
    writeFileSync(join(dir, 'frames-case', 'F1.png'), readFileSync(join(dir, 'wafer.png')));
    const run = lamella(dir, 'series', 'frames-case', ...STACK, '--fps', '1', '--out', 'series-case');
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/share the name stem "f1" \(names that differ only in case count as equal\)|share the name stem "F1" \(names that differ only in case count as equal\)/);
  });

  it('a run whose every photo fails leaves no --out folder it made; an existing folder is kept', () => {
    writeFileSync(join(dir, 'broken.png'), 'not a PNG at all');
    const run = lamella(dir, 'map', 'broken.png', ...STACK, '--out', 'failed-out');
    expect(run.status).toBe(3);
    expect(existsSync(join(dir, 'failed-out'))).toBe(false);
    mkdirSync(join(dir, 'kept-out'));
    expect(lamella(dir, 'map', 'broken.png', ...STACK, '--out', 'kept-out').status).toBe(3);
    expect(existsSync(join(dir, 'kept-out'))).toBe(true);
  });
});

describe('frame records on disk (src/series/frameRecordJson.ts)', () => {
  // An invented record with every block that is camelCase in memory.
  const record: FrameRecord = {
    format: 'lamella-series-frame', version: 1, lamella_version: '0.1.0', frame: 'f1.jpg', stem: 'f1', settingsHash: '0123456789abcdef',
    width: 4, height: 3, priorFrame: null,
    stats: { mean_nm: 500, median_nm: 500, std_nm: 0, min_nm: 500, max_nm: 500, p05_nm: 500, p95_nm: 500, uniformity: 0, coverage: 1, thin_fraction: 0, thin_regions: 0, film_area_px: 12 },
    fitted: { exposure: 6, whiteBalance: [1, 1, 1], flare: [0, 0, 0], responseSource: 'identity' },
    darkLimitNm: 20, thinRegions: [{ id: 1, areaPx: 2, areaUm2: null, centroidX: 1, centroidY: 1, minThicknessNm: 30, bbox: [0, 0, 2, 1] }], warnings: [],
    filmArea: { mode: 'auto', areaPx: 12, fraction: 1, areaUm2: null, found: true, excludedPx: { outside_region: 0, dark_surroundings: 0, not_film_colour: 0, glint: 0, isolated: 0, undecided: 0 } },
    exposureField: null, lightEvenness: { gainMin: 0.98, gainMax: 1.02, pixelsUsed: 12, logGainCoefficients: [0, 0, 0, 0, 0, 0, 0] },
    fitQuality: { median_delta_e2000: 0.5, p95_delta_e2000: 1, unmatched_fraction: 0, verdict: 'good' },
    seriesHash: 'fedcba9876543210', source: { sizeBytes: 100, mtimeMs: 1.5, sha256: 'a'.repeat(64) },
    inputFiles: { 'stack /data/My Stack.json': 'b'.repeat(64) }, previewRangeNm: [0, 1000],
  };

  it('the JSON form is snake_case (paths kept as keys), follows the schema, and reads back to the same record (a round trip through our own code)', () => {
    const json = frameRecordToJson(record);
    expect(notSnakeCase(json)).toEqual([]);
    expect(validator('series-frame')(json)).toEqual([]);
    expect((json.input_files as Record<string, string>)['stack /data/My Stack.json']).toBe('b'.repeat(64));
    expect(frameRecordFromJson(JSON.parse(JSON.stringify(json)))).toEqual(record);
  });

  it('a record written before the convention (camelCase, no schema_version) is read as it is, so a run resumes over it', () => {
    expect(frameRecordFromJson(JSON.parse(JSON.stringify(record)))).toEqual(record);
    expect(frameRecordFromJson({ format: 'something else' })).toBeNull();
  });
});
