/**
 * Synthetic inputs for the report tests. Invented data in a scenario of our own (demo only, no
 * physical claim): a vertical soap-film-like frame whose thickness grows downwards, coloured by
 * a made-up cosine palette; and a "ramp" grid whose value encodes the pixel position
 * (thickness = 100 + x + 1000·y) so a pointer readout can be checked against the stored value.
 */
import sharp from 'sharp';
import type { MapReportInput, ReportGrid, SeriesReportInput, ThinRegionRow } from '../src/report/types.js';

/** Made-up RGB for a thickness (demo palette, not a physical model). */
export function demoColour(thicknessNm: number): [number, number, number] {
  if (!Number.isFinite(thicknessNm)) return [20, 20, 24];
  const fade = Math.exp(-thicknessNm / 1500);
  const c = (period: number, phase: number) => 128 + 120 * fade * Math.cos((2 * Math.PI * thicknessNm) / period + phase);
  const dark = Math.min(1, thicknessNm / 120);
  return [c(560, 0), c(470, 1.1), c(400, 2.3)].map((v) => Math.round(v * dark)) as [number, number, number];
}

export async function pngOf(width: number, height: number, rgbAt: (x: number, y: number) => [number, number, number]): Promise<Buffer> {
  const data = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) data.set(rgbAt(x, y), (y * width + x) * 3);
  }
  return sharp(data, { raw: { width, height, channels: 3 } }).png().toBuffer();
}

/** Grid of `originalWidth × originalHeight` pixels downsampled by `step`; a cell holds f(x0, y0) of its top-left pixel. */
export function gridFrom(originalWidth: number, originalHeight: number, step: number,
  thickness: (x: number, y: number) => number, confidence: (x: number, y: number) => number,
  status?: (x: number, y: number) => number): ReportGrid {
  const width = Math.ceil(originalWidth / step);
  const height = Math.ceil(originalHeight / step);
  const t = new Float32Array(width * height);
  const q = new Float32Array(width * height);
  const s = status ? new Uint8Array(width * height) : undefined;
  for (let cy = 0; cy < height; cy++) {
    for (let cx = 0; cx < width; cx++) {
      t[cy * width + cx] = thickness(cx * step, cy * step);
      q[cy * width + cx] = confidence(cx * step, cy * step);
      if (s && status) s[cy * width + cx] = status(cx * step, cy * step);
    }
  }
  return { width, height, step, originalWidth, originalHeight, thicknessNm: t, confidence: q, ...(s ? { status: s } : {}) };
}

export const rampThickness = (x: number, y: number) => (x === 3 && y === 2 ? NaN : 100 + x + 1000 * y);
/** PixelStatus code of the ramp: 1 (dark) where the thickness is NaN, else 0 (ok). */
export const rampStatus = (x: number, y: number) => (x === 3 && y === 2 ? 1 : 0);
export const rampConfidence = (x: number, y: number) => (x === 3 && y === 2 ? NaN : ((x + 2 * y) % 10) / 10);

/** Film thickness of the demo scenario: thin at the top, thicker downwards, a few thin spots. */
export function demoThickness(x: number, y: number, width: number, height: number): number {
  const u = x / width;
  const v = y / height;
  let d = 30 + 1100 * v ** 1.4 + 60 * Math.sin(9 * u + 4 * v) * v;
  const spot = Math.exp(-(((u - 0.3) / 0.06) ** 2 + ((v - 0.55) / 0.05) ** 2));
  d -= spot * d * 0.9;
  if ((u - 0.5) ** 2 + (v - 0.5) ** 2 > 0.26) return NaN;
  return d;
}

export interface MapFixtureOptions {
  title?: string;
  originalWidth: number;
  originalHeight: number;
  step: number;
  kind: 'ramp' | 'demo';
  thinRegions?: ThinRegionRow[];
}

export async function makeMapInput(o: MapFixtureOptions): Promise<MapReportInput> {
  const W = o.originalWidth;
  const H = o.originalHeight;
  const thickness = o.kind === 'ramp' ? rampThickness : (x: number, y: number) => demoThickness(x, y, W, H);
  const confidence = o.kind === 'ramp' ? rampConfidence : (x: number, y: number) => (Number.isFinite(thickness(x, y)) ? 0.6 + 0.4 * Math.cos(x / 40) ** 2 : NaN);
  const grid = gridFrom(W, H, o.step, thickness, confidence, o.kind === 'ramp' ? rampStatus : undefined);
  const shown = o.kind === 'ramp' ? (x: number, y: number) => ((100 + x + 1000 * y) % 1200) : thickness;
  const photoPng = await pngOf(W, H, (x, y) => demoColour(shown(x, y)));
  const mapPng = await pngOf(W, H, (x, y) => {
    const d = shown(x, y);
    if (!Number.isFinite(d)) return [40, 40, 46];
    const t = Math.min(1, Math.max(0, d / 1200));
    return [Math.round(255 * Math.min(1, 1.6 * t)), Math.round(255 * Math.sin(Math.PI * t)), Math.round(255 * (1 - t))];
  });
  const values = Array.from(grid.thicknessNm).filter(Number.isFinite).sort((a, b) => a - b);
  const q = (p: number) => values[Math.min(values.length - 1, Math.floor(p * values.length))];
  const edgesNm = Array.from({ length: 25 }, (_, i) => i * 50);
  const counts = edgesNm.slice(1).map((e, i) => values.filter((v) => v >= edgesNm[i] && v < e).length);
  return {
    title: o.title ?? 'Demo film <frame 7> & "notes"',
    generatedAt: '2026-12-01T21:00:00Z',
    photoPng, mapPng,
    colourBar: { minNm: 0, maxNm: 1200, stops: [{ nm: 0, hex: '#0000ff' }, { nm: 600, hex: '#ffff00' }, { nm: 1200, hex: '#ff0000' }] },
    grid,
    thinBelowNm: 100,
    stats: { mean_nm: values.reduce((a, b) => a + b, 0) / values.length, median_nm: q(0.5), std_nm: 210.5, min_nm: values[0],
      max_nm: values[values.length - 1], p05_nm: q(0.05), p95_nm: q(0.95), uniformity: 0.42, coverage: values.length / grid.thicknessNm.length, thin_fraction: 0.031 },
    histogram: { edgesNm, counts },
    thinRegions: o.thinRegions ?? [
      { id: 1, areaPx: 420, areaUm2: 1680.5, centroidX: Math.round(0.3 * W), centroidY: Math.round(0.55 * H), minThicknessNm: 12.5,
        bbox: [Math.round(0.24 * W), Math.round(0.5 * H), Math.round(0.12 * W), Math.round(0.1 * H)] },
      { id: 2, areaPx: 35, centroidX: Math.round(0.5 * W), centroidY: 6, minThicknessNm: null, bbox: [Math.round(0.45 * W), 2, 12, 9] },
    ],
    settings: { stack: 'soap film <water/glycerol>', light: 'D65', angleDeg: 0, maxThicknessNm: 1200, region: null, anchors: [] },
    fitted: { exposure: 0.8731, whiteBalance: [1.02, 1, 0.97], flare: [0.01, 0.012, 0.009], residualDeltaE: 2.31 },
    calibration: o.kind === 'demo' ? { file: 'cal & <bench>.json', exposure: 0.87 } : null,
    warnings: ['3.1 % of pixels saturated in frame <7>'],
  };
}

export async function makeSeriesInput(frameCount: number, withMap: boolean): Promise<SeriesReportInput> {
  const frames = [];
  for (let i = 0; i < frameCount; i++) {
    const timeS = i * 10;
    const mean = 60 + 900 * Math.exp(-timeS / 60);
    frames.push({
      frame: `frame_${String(i).padStart(3, '0')}<&>.jpg`, timeS, meanNm: mean, medianNm: mean * 0.95, minNm: mean * 0.4,
      thinFraction: Math.min(1, Math.max(0, (timeS - 40) / 200)), thinRegions: Math.max(0, i - 3), coverage: 0.93,
      mapPng: await pngOf(48, 32, (x, y) => demoColour(mean * (0.5 + y / 32) + 3 * x)),
    });
  }
  const curve: Array<[number, number]> = Array.from({ length: 61 }, (_, k) => [k * 4, 60 + 900 * Math.exp(-(k * 4) / 60)]);
  return {
    title: 'Drainage run <A&B>', generatedAt: '2026-12-01T21:30:00Z', frames, thinBelowNm: 100,
    fits: [{ model: 'exponential', formula: 'h(t) = h∞ + (h0 − h∞)·exp(−t/τ)', rSquared: 0.9981,
      parameters: { h0: { value: 960, uncertainty: 4.2 }, hInf: { value: 60, uncertainty: 2.1 }, tau: { value: 60, uncertainty: 1.3 } },
      curve, crossing: { quantity: 'mean', timeS: 188.4, lowS: 176.2, highS: 201.9, extrapolated: true } }],
    settings: { light: 'D65', stack: 'soap film', thinBelowNm: 100 },
    calibration: null,
    warnings: [],
    lastMap: withMap ? await makeMapInput({ originalWidth: 320, originalHeight: 240, step: 1, kind: 'demo', title: frames[frames.length - 1]?.frame }) : undefined,
  };
}
