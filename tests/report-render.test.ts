/**
 * renderMapReport() / renderSeriesReport() checked as text in Node: the document is self-contained
 * (every src/href is a data: URI or an in-page anchor, a Content-Security-Policy forbids requests),
 * input text is escaped, the embedded grid decodes to the input values bit for bit, the cautions
 * are present, and bad input is refused with errors naming the field. Also the number helpers.
 * Inputs are synthetic (tests/report-fixtures.ts).
 */
import { describe, expect, it, beforeAll } from 'vitest';
import { decodeFloat32Base64, encodeFloat32Base64 } from '../src/report/encodeFloat32Base64.js';
import { formatNm, formatPercent, formatSignificant, shortestFloat32Text } from '../src/report/formatNumber.js';
import { renderMapReport, renderSeriesReport } from '../src/report/index.js';
import { imageDataUri, sniffImageType } from '../src/report/imageDataUri.js';
import { makeReportGrid } from '../src/report/makeReportGrid.js';
import { cellIndexOfPixel, columnProfile } from '../src/report/reportGrid.js';
import type { ThinRegion } from '../src/map/types.js';
import type { MapReportInput, SeriesReportInput, ThinRegionRow } from '../src/report/types.js';
import { makeMapInput, makeSeriesInput } from './report-fixtures.js';

function embeddedJson(html: string, id: string): any {
  const m = new RegExp(`<script type="application/json" id="${id}">([^<]*)</script>`).exec(html);
  if (!m) throw new Error(`no ${id}`);
  return JSON.parse(m[1]);
}

describe('renderMapReport()', () => {
  let input: MapReportInput;
  let html: string;
  beforeAll(async () => {
    input = await makeMapInput({ originalWidth: 50, originalHeight: 30, step: 1, kind: 'ramp', title: '<script>alert("x")</script> & co' });
    html = renderMapReport(input);
  });

  it('returns one HTML document whose every src/href is a data: URI or an in-page anchor', () => {
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    const refs = [...html.matchAll(/\s(?:src|href)="([^"]*)"/g)].map((m) => m[1]);
    expect(refs.length).toBeGreaterThan(3);
    for (const r of refs) expect(r.startsWith('data:') || r.startsWith('#')).toBe(true);
    expect(html).not.toMatch(/url\((?!#)/);
    expect(html).not.toMatch(/@import|<link rel="stylesheet"|<script src/);
    expect(html).toContain("default-src 'none'; img-src data:");
  });
  it('escapes the title everywhere it appears', () => {
    expect(html).not.toContain('<script>alert');
    expect(html).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; co');
  });
  it('embeds thickness and confidence as base64 float32 that decode to the input bit for bit', () => {
    const data = embeddedJson(html, 'lamella-map-data');
    const t = decodeFloat32Base64(data.grid.thicknessB64);
    const q = decodeFloat32Base64(data.grid.confidenceB64);
    expect(Buffer.from(t.buffer).equals(Buffer.from(input.grid.thicknessNm.buffer))).toBe(true);
    expect(Buffer.from(q.buffer).equals(Buffer.from(input.grid.confidence.buffer))).toBe(true);
    expect(data.grid).toMatchObject({ width: 50, height: 30, step: 1, originalWidth: 50, originalHeight: 30 });
  });
  it('contains the cautions text, the photo and map images, charts and the thin-region outlines', () => {
    expect(html).toContain('not a substitute for qualified metrology (ellipsometry, reflectometry, profilometry)');
    expect(html).toContain('safety data sheets');
    expect(html).toContain('eye protection');
    expect(html.match(/<img /g)).toHaveLength(2);
    expect(html).toContain('id="histogram-chart"');
    expect(html).toContain('id="profile-chart"');
    expect(html.match(/class="region" data-region=/g)).toHaveLength(input.thinRegions.length);
  });
  it('reads a region box as x, y, width, height by default and as corners when bboxFormat says so', async () => {
    const a = renderMapReport({ ...input, thinRegions: [{ id: 9, areaPx: 4, centroidX: 1, centroidY: 1, minThicknessNm: 5, bbox: [2, 3, 4, 5] }] });
    expect(a).toContain('data-region="9" x="2" y="3" width="4" height="5"');
    const b = renderMapReport({ ...input, thinRegions: [{ id: 9, areaPx: 4, centroidX: 1, centroidY: 1, minThicknessNm: 5, bbox: [2, 3, 4, 5], bboxFormat: 'corners' }] });
    expect(b).toContain('data-region="9" x="2" y="3" width="3" height="3"');
  });
  it('accepts the map engine\'s ThinRegion records as rows (null area, readonly box) and prints — for the missing area', () => {
    const fromMap: ThinRegion = { id: 4, areaPx: 12, areaUm2: null, centroidX: 5, centroidY: 6, minThicknessNm: 20, bbox: [3, 4, 5, 6] };
    const withArea: ThinRegion = { ...fromMap, id: 5, areaUm2: 48 };
    const rows: ThinRegionRow[] = [fromMap, withArea];
    const text = renderMapReport({ ...input, thinRegions: rows });
    expect(text).toContain('<th class="num">Area (µm²)</th>');
    expect(text).toMatch(/<tr data-region="4">.*?<td class="num">—<\/td>/);
    expect(text).toContain('data-region="5" x="3" y="4" width="5" height="6"');
  });
  it('says so when the grid is downsampled, and passes the caller note through escaped', async () => {
    const small = await makeMapInput({ originalWidth: 41, originalHeight: 21, step: 4, kind: 'ramp' });
    const text = renderMapReport({ ...small, downsampleNote: 'map <reduced> for the report' });
    expect(text).toContain('downsampled by 4');
    expect(text).toContain('map &lt;reduced&gt; for the report');
  });
  it('renders a map with no estimates at all (all-NaN grid, null statistics, empty histogram, no threshold, no regions)', () => {
    const n = input.grid.width * input.grid.height;
    const empty: MapReportInput = {
      ...input, thinBelowNm: null, thinRegions: [], histogram: { edgesNm: [], counts: [] }, calibration: null, warnings: [],
      stats: { mean_nm: null, median_nm: null, coverage: 0 }, colourBar: { ...input.colourBar, minNm: 500, maxNm: 500 },
      grid: { ...input.grid, thicknessNm: new Float32Array(n).fill(NaN), confidence: new Float32Array(n).fill(NaN) },
    };
    const text = renderMapReport(empty);
    expect(text).toContain('No thin regions.');
    expect(text).toContain('no thin threshold set');
    expect(text).toContain('No calibration file was used.');
    expect(text).not.toContain('id="warnings"');
  });
  it('settings and calibration tables show labelled values with units, the raw key as tooltip; confidence is explained by the readout', () => {
    const text = renderMapReport({
      ...input,
      settings: { thin_below_nm: 50, angle_deg: 12.5, pixel_size_um: 40, series_prior: true, anchors: [] },
      // An older calibration file (camelCase) and a current one read alike.
      calibration: { residual_rms_encoded: 0.0021, fitted: { filmIndexScale: 1.02, white_balance: [1.1, 1, 0.9] } },
    });
    expect(text).toContain('<th scope="row" title="thin_below_nm">Thin below</th><td>50 nm</td>');
    expect(text).toContain('<th scope="row" title="angle_deg">Angle of incidence</th><td>12.5°</td>');
    expect(text).toContain('<td>40 µm</td>');
    expect(text).toMatch(/title="series_prior: [^"]+">Previous frame used as order prior<\/th><td>yes<\/td>/);
    expect(text).toContain('<td>none</td>');
    expect(text).toMatch(/>RMS colour residual<\/th><td>0\.0021 \(encoded 0–1\)<\/td>/);
    expect(text).toMatch(/>Film index scale<\/th><td>1\.02 ×<\/td>/);
    expect(text).toMatch(/>White-balance gains R, G, B<\/th><td>\[1\.1, 1, 0\.9\] ×<\/td>/);
    for (const raw of ['>series_prior<', '>residual_rms_encoded<', '>thin_below_nm<', '>filmIndexScale<']) expect(text).not.toContain(raw);
    expect(text).toMatch(/<b>Confidence<\/b> \(0 to 1\): how well the pixel&#39;s colour matches/);
  });
  it('refuses a colour bar whose maximum is below its minimum', () => {
    expect(() => renderMapReport({ ...input, colourBar: { ...input.colourBar, minNm: 10, maxNm: 5 } }))
      .toThrow(/colourBar: minNm and maxNm must be finite with minNm <= maxNm, received 10 and 5/);
  });
  it('refuses a grid whose arrays do not match width × height, naming the field', () => {
    const bad = { ...input, grid: { ...input.grid, confidence: new Float32Array(3) } };
    expect(() => renderMapReport(bad)).toThrow(RangeError);
    expect(() => renderMapReport(bad)).toThrow(/input.grid.confidence must have width × height = 1500 values, received 3/);
  });
  it('refuses a grid width that does not fit originalWidth / step', () => {
    const bad = { ...input, grid: { ...input.grid, step: 2 } };
    expect(() => renderMapReport(bad)).toThrow(/input.grid.width must be ceil\(originalWidth \/ step\) = 25, received 50/);
  });
  it('refuses photo bytes that are not PNG or JPEG, naming the field', () => {
    expect(() => renderMapReport({ ...input, photoPng: Buffer.from('GIF89a') })).toThrow(/input.photoPng must hold PNG \(or JPEG\) bytes, received 6 bytes starting 47 49 46 38/);
  });
  it('refuses a non-string title and a histogram with mismatched edges', () => {
    expect(() => renderMapReport({ ...input, title: 5 as unknown as string })).toThrow(/input.title must be a string, received number 5/);
    expect(() => renderMapReport({ ...input, histogram: { edgesNm: [0, 1], counts: [1, 2] } })).toThrow(/input.histogram: edgesNm must have/);
  });
  it('shows the light field as a small grey picture (one cell per grid value, dim = dark) with its range, and refuses a grid that does not match', () => {
    const relativeGain = [0.7, 0.8, 0.9, 1, 1.05, 1.1];
    const light = { field: { gridWidth: 3, gridHeight: 2, relativeGain, gainMin: 0.72, gainMax: 1.08, rounds: 2, source: 'photo' as const }, evenness: { gainMin: 0.99, gainMax: 1.01 } };
    const text = renderMapReport({ ...input, light });
    const card = /<section class="card" id="light">[\s\S]*?<\/section>/.exec(text)![0];
    expect(card).toContain('fitted to this photo (2 rounds)');
    expect(card).toContain('×0.72 to ×1.08');
    expect(card).toContain('×0.990 to ×1.010');
    const fills = [...card.matchAll(/<rect x="\d+" y="\d+" width="\d+" height="\d+" fill="(#[0-9a-f]{6})"\/>/g)].map((m) => parseInt(m[1].slice(1, 3), 16));
    expect(fills).toHaveLength(6);
    // Monotone in the gain: the dimmest cell darkest, the brightest lightest.
    for (let k = 1; k < 6; k++) expect(fills[k]).toBeGreaterThan(fills[k - 1]);
    expect(text).toContain('href="#light"');
    // Without a field: says one exposure, no picture.
    const none = renderMapReport({ ...input, light: { field: null, evenness: null } });
    expect(none).toContain('none: one exposure for the whole photo');
    expect(none).not.toContain('class="light-field"');
    expect(() => renderMapReport({ ...input, light: { ...light, field: { ...light.field, relativeGain: [1, 2] } } })).toThrow(/input.light.field.relativeGain must hold gridWidth × gridHeight/);
  });
});

describe('renderSeriesReport()', () => {
  let input: SeriesReportInput;
  let html: string;
  beforeAll(async () => {
    input = await makeSeriesInput(6, false);
    html = renderSeriesReport(input);
  });
  it('escapes frame names in tables and keeps them intact in the embedded data', () => {
    expect(html).not.toContain('frame_000<&>');
    expect(html).toContain('frame_000&lt;&amp;&gt;.jpg');
    expect(embeddedJson(html, 'lamella-series-data').frames[0].frame).toBe('frame_000<&>.jpg');
  });
  it('sorts frames by time for the charts and the slider', () => {
    const shuffled = renderSeriesReport({ ...input, frames: [...input.frames].reverse() });
    expect(embeddedJson(shuffled, 'lamella-series-data').frames.map((f: { timeS: number }) => f.timeS)).toEqual([0, 10, 20, 30, 40, 50]);
  });
  it('marks an extrapolated crossing as such, in the chart and the fits table', () => {
    expect(html).toContain('188 s, extrapolated');
    expect(html).toContain('188.4 s (176.2–201.9 s), extrapolated');
  });
  it('has one thumbnail per frame, only the last one visible at first, and no map view without lastMap', () => {
    expect(html.match(/<img data-frame-index=/g)).toHaveLength(6);
    expect(html.match(/<img data-frame-index="\d+" hidden/g)).toHaveLength(5);
    expect(html).not.toContain('id="lamella-map-data"');
  });
  it('refuses a frame with a non-finite time, naming it', () => {
    const frames = input.frames.map((f, i) => (i === 2 ? { ...f, timeS: NaN } : f));
    expect(() => renderSeriesReport({ ...input, frames })).toThrow(/input.frames\[2\].timeS must be a finite number/);
  });
  it('renders frames without estimates and fits without curve or crossing', () => {
    const frames = input.frames.map((f) => ({ ...f, meanNm: null, medianNm: null, minNm: null, thinFraction: null }));
    const text = renderSeriesReport({ ...input, thinBelowNm: null, frames,
      fits: [{ model: 'power law', formula: 'h = a·t^b', parameters: {}, rSquared: null, curve: [], crossing: null }] });
    expect(text).toContain('No thin fraction: no thin threshold was set.');
    expect(text).toContain('not computed');
  });
  it('renders an empty series without failing', () => {
    const text = renderSeriesReport({ ...input, frames: [], fits: [] });
    expect(text).toContain('No frames.');
  });
});

describe('number text and grid lookup', () => {
  it('shortestFloat32Text() prints the shortest text that reads back as the same float32 (Java Float.toString outputs, from memory)', () => {
    expect(shortestFloat32Text(Math.fround(0.1))).toBe('0.1');
    expect(shortestFloat32Text(Math.fround(1 / 3))).toBe('0.33333334');
    expect(shortestFloat32Text(Math.fround(Math.PI))).toBe('3.1415927');
    expect(shortestFloat32Text(Math.fround(16777217))).toBe('16777216');
    expect(shortestFloat32Text(Math.fround(100 + 37 + 1000 * 29))).toBe('29137');
  });
  it('encodeFloat32Base64() writes IEEE 754 binary32 little-endian (1.0 = 0x3F800000, quiet NaN = 0x7FC00000)', () => {
    expect(encodeFloat32Base64(new Float32Array([1]))).toBe(Buffer.from([0, 0, 0x80, 0x3f]).toString('base64'));
    expect(encodeFloat32Base64(new Float32Array([NaN]))).toBe(Buffer.from([0, 0, 0xc0, 0x7f]).toString('base64'));
    expect(() => encodeFloat32Base64([1] as unknown as Float32Array)).toThrow(/values must be a Float32Array, received Array/);
  });
  it('formatNm(), formatPercent(), formatSignificant() print — for missing values', () => {
    expect(formatNm(12.345)).toBe('12.3 nm');
    expect(formatNm(null)).toBe('—');
    expect(formatNm(-0.01)).toBe('0.0 nm');
    expect(formatPercent(0.125)).toBe('12.5 %');
    expect(formatPercent(NaN)).toBe('—');
    expect(formatSignificant(0.000012346)).toBe('1.235e-5');
    expect(formatSignificant(123.456, 4)).toBe('123.5');
  });
  it('cellIndexOfPixel() maps original pixels to cells by floor(x / step), clamping the last partial cell', () => {
    const grid = { width: 3, height: 2, step: 4, originalWidth: 10, originalHeight: 7, thicknessNm: new Float32Array(6), confidence: new Float32Array(6) };
    expect(cellIndexOfPixel(grid, 0, 0)).toBe(0);
    expect(cellIndexOfPixel(grid, 3, 3)).toBe(0);
    expect(cellIndexOfPixel(grid, 4, 4)).toBe(4);
    expect(cellIndexOfPixel(grid, 9, 6)).toBe(5);
  });
  it('columnProfile() samples one column with cell-centre rows and null for NaN', () => {
    const grid = { width: 2, height: 3, step: 2, originalWidth: 4, originalHeight: 6,
      thicknessNm: new Float32Array([1, 2, 3, NaN, 5, 6]), confidence: new Float32Array(6) };
    expect(columnProfile(grid, 3)).toEqual([[0.5, 2], [2.5, null], [4.5, 6]]);
  });
  it('sniffImageType() tells PNG and JPEG from their signatures; imageDataUri() refuses empty bytes', () => {
    expect(sniffImageType(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0]))).toBe('image/png');
    expect(sniffImageType(Buffer.from([0xff, 0xd8, 0xff, 0xe0]))).toBe('image/jpeg');
    expect(() => imageDataUri(Buffer.alloc(0), 'photoPng')).toThrow(/photoPng must hold PNG \(or JPEG\) bytes, received 0 bytes starting \(empty\)/);
  });
});

describe('makeReportGrid()', () => {
  const full = (w: number, h: number) => {
    const t = new Float32Array(w * h);
    const q = new Float32Array(w * h);
    for (let i = 0; i < t.length; i++) { t[i] = 100 + (i % w) + 1000 * Math.floor(i / w); q[i] = (i % 7) / 7; }
    return { width: w, height: h, thicknessNm: t, confidence: q };
  };
  it('keeps a map within the cell budget unchanged (step 1, equal values)', () => {
    const m = full(40, 30);
    const g = makeReportGrid(m, 1200);
    expect(g.step).toBe(1);
    expect(Array.from(g.thicknessNm)).toEqual(Array.from(m.thicknessNm));
    expect(g.thicknessNm).not.toBe(m.thicknessNm);
  });
  it('downsamples by the smallest step that fits, each cell holding its top-left pixel', () => {
    const m = full(1001, 601); // 601 601 pixels → step 2 gives 501 × 301 = 150 801 cells ≤ 250 000
    const g = makeReportGrid(m);
    expect(g.step).toBe(2);
    expect([g.width, g.height]).toEqual([501, 301]);
    expect(g.width * g.height).toBeLessThanOrEqual(250_000);
    for (const [cx, cy] of [[0, 0], [500, 300], [123, 77]]) {
      expect(g.thicknessNm[cy * g.width + cx]).toBe(100 + cx * 2 + 1000 * cy * 2);
    }
  });
  it('carries the status codes along with the values when given', () => {
    const m = full(6, 4);
    const status = Uint8Array.from({ length: 24 }, (_, i) => i % 6);
    const g = makeReportGrid({ ...m, status }, 6);
    expect(g.step).toBe(2);
    expect(Array.from(g.status!)).toEqual([0, 2, 4, 0, 2, 4]);
  });
  it('refuses arrays of the wrong length, naming them', () => {
    expect(() => makeReportGrid({ ...full(4, 4), confidence: new Float32Array(3) }))
      .toThrow(/confidence must be a Float32Array of width × height = 16 values, received 3/);
  });
  it('a report embedding a 250 000-cell grid stays under 3 MB of HTML beyond its images', async () => {
    const small = await makeMapInput({ originalWidth: 20, originalHeight: 10, step: 1, kind: 'ramp' });
    const grid = makeReportGrid(full(1000, 250));
    expect([grid.step, grid.width * grid.height]).toEqual([1, 250_000]);
    const html = renderMapReport({ ...small, grid });
    const images = small.photoPng.length + small.mapPng.length;
    expect(html.length - (images * 4) / 3).toBeLessThan(3_000_000);
  });
});
