/**
 * The flow overlay PNG: the first frame's thickness in Lamella's colour scale (../map/colourScale.ts,
 * no value = dark grey), arrows on a regular grid showing the displacement (each the mean of the
 * known vectors in its grid cell, drawn only when at least half of the cell has one), scaled so the
 * 95th-percentile arrow spans about one grid step (but one step never stands for less than
 * `minFullScalePerS`, 1 px per frame, so a still film's noise stays short); the scale is written below. Drawn as SVG
 * and rasterised (../io/rasteriseSvg.ts).
 */
import { colourScaleBytes, SCALE_ENTRIES } from '../map/colourScale.js';
import { encodePng } from '../io/encodeImage.js';
import { rasteriseSvg } from '../io/rasteriseSvg.js';

export interface OverlayInput {
  readonly thicknessNm: Float32Array;
  readonly width: number;
  readonly height: number;
  /** Velocity per second in the field's unit, NaN where unknown. */
  readonly vx: Float32Array;
  readonly vy: Float32Array;
  /** Colour range of the thickness, nm. */
  readonly rangeNm: readonly [number, number];
  /** Unit of the velocities, e.g. "px/s" or "µm/s". */
  readonly unit: string;
  /** The least speed an arrow of one grid step stands for (e.g. 1 px per frame), so that a still film's noise stays small. */
  readonly minFullScalePerS?: number;
}

function thicknessRgb(t: Float32Array, width: number, height: number, [lo, hi]: readonly [number, number]): Uint8Array {
  const scale = colourScaleBytes();
  const out = new Uint8Array(width * height * 3);
  const span = hi > lo ? hi - lo : 1;
  for (let i = 0; i < width * height; i++) {
    const v = t[i];
    if (!Number.isFinite(v)) {
      out[3 * i] = 40;
      out[3 * i + 1] = 40;
      out[3 * i + 2] = 40;
      continue;
    }
    const k = Math.max(0, Math.min(SCALE_ENTRIES - 1, Math.round(((v - lo) / span) * (SCALE_ENTRIES - 1))));
    out[3 * i] = scale[3 * k];
    out[3 * i + 1] = scale[3 * k + 1];
    out[3 * i + 2] = scale[3 * k + 2];
  }
  return out;
}

export async function flowOverlayPng(input: OverlayInput): Promise<Buffer> {
  const { width, height, vx, vy, thicknessNm } = input;
  const base = await encodePng({ data: thicknessRgb(thicknessNm, width, height, input.rangeNm), width, height, channels: 3 });
  const zoom = Math.max(1, Math.min(4, Math.round(640 / width)));
  const step = Math.max(6, Math.round(Math.min(width, height) / 18));
  const arrows: Array<[number, number, number, number]> = [];
  for (let y0 = 0; y0 + step <= height; y0 += step) {
    for (let x0 = 0; x0 + step <= width; x0 += step) {
      let su = 0;
      let sv = 0;
      let n = 0;
      for (let y = y0; y < y0 + step; y++) {
        for (let x = x0; x < x0 + step; x++) {
          const a = vx[y * width + x];
          const b = vy[y * width + x];
          if (Number.isFinite(a) && Number.isFinite(b)) {
            su += a;
            sv += b;
            n++;
          }
        }
      }
      if (n * 2 >= step * step) arrows.push([x0 + step / 2, y0 + step / 2, su / n, sv / n]);
    }
  }
  const speeds = arrows.map(([, , u, v]) => Math.hypot(u, v)).sort((a, b) => a - b);
  const p95 = speeds.length > 0 ? speeds[Math.min(speeds.length - 1, Math.floor(0.95 * speeds.length))] : 0;
  const fullScale = Math.max(p95, input.minFullScalePerS ?? 0);
  const lengthPerSpeed = fullScale > 0 ? step / fullScale : 0;
  const parts: string[] = [];
  for (const [x, y, u, v] of arrows) {
    const dx = u * lengthPerSpeed * zoom;
    const dy = v * lengthPerSpeed * zoom;
    const len = Math.hypot(dx, dy);
    const cx = x * zoom;
    const cy = y * zoom;
    if (len < 1.5) {
      parts.push(`<circle cx="${cx.toFixed(1)}" cy="${cy.toFixed(1)}" r="1.5" fill="#fff" stroke="#000" stroke-width="0.6"/>`);
      continue;
    }
    const x1 = cx - dx / 2;
    const y1 = cy - dy / 2;
    const x2 = cx + dx / 2;
    const y2 = cy + dy / 2;
    const head = Math.min(6, 0.4 * len);
    const ux = dx / len;
    const uy = dy / len;
    const hx1 = x2 - head * ux + 0.5 * head * uy;
    const hy1 = y2 - head * uy - 0.5 * head * ux;
    const hx2 = x2 - head * ux - 0.5 * head * uy;
    const hy2 = y2 - head * uy + 0.5 * head * ux;
    const path = `M${x1.toFixed(1)},${y1.toFixed(1)} L${x2.toFixed(1)},${y2.toFixed(1)} M${hx1.toFixed(1)},${hy1.toFixed(1)} L${x2.toFixed(1)},${y2.toFixed(1)} L${hx2.toFixed(1)},${hy2.toFixed(1)}`;
    parts.push(`<path d="${path}" stroke="#000" stroke-width="3" fill="none" stroke-linecap="round" stroke-linejoin="round"/>`);
    parts.push(`<path d="${path}" stroke="#fff" stroke-width="1.4" fill="none" stroke-linecap="round" stroke-linejoin="round"/>`);
  }
  const W = width * zoom;
  const H = height * zoom;
  const label = fullScale > 0 ? `arrow of one grid step (${step} px) = ${fullScale.toPrecision(3)} ${input.unit}` : 'no motion measured';
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" width="${W}" height="${H + 18}" viewBox="0 0 ${W} ${H + 18}">`
    + `<rect width="${W}" height="${H + 18}" fill="#fff"/>`
    + `<image x="0" y="0" width="${W}" height="${H}" preserveAspectRatio="none" style="image-rendering:pixelated" xlink:href="data:image/png;base64,${base.toString('base64')}"/>`
    + parts.join('')
    + `<text x="4" y="${H + 13}" font-family="sans-serif" font-size="11" fill="#222">${label.replace(/&/g, '&amp;').replace(/</g, '&lt;')}</text>`
    + '</svg>';
  return rasteriseSvg(svg);
}
