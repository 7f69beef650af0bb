/**
 * The thickness grid embedded in the map report: checks of its shape, the lookup from an
 * ORIGINAL image pixel to its grid cell (cell = floor(pixel / step), as the contract defines),
 * its finite value range, and the thickness profile along one column (the drainage direction).
 */
import type { ReportGrid } from './types.js';

export function checkReportGrid(grid: ReportGrid, name = 'grid'): void {
  if (grid === null || typeof grid !== 'object') throw new TypeError(`${name} must be an object, received ${grid === null ? 'null' : typeof grid}`);
  for (const key of ['width', 'height', 'step', 'originalWidth', 'originalHeight'] as const) {
    const v = grid[key];
    if (!Number.isInteger(v) || v < 1) throw new RangeError(`${name}.${key} must be an integer >= 1, received ${v}`);
  }
  for (const [key, size, cells] of [['width', grid.originalWidth, grid.width], ['height', grid.originalHeight, grid.height]] as const) {
    const lo = Math.floor(size / grid.step);
    const hi = Math.ceil(size / grid.step);
    if (cells < Math.max(1, lo) || cells > hi) {
      throw new RangeError(`${name}.${key} must be ceil(original${key === 'width' ? 'Width' : 'Height'} / step) = ${hi}, received ${cells}`);
    }
  }
  if (grid.status !== undefined && (!(grid.status instanceof Uint8Array) || grid.status.length !== grid.width * grid.height)) {
    throw new RangeError(`${name}.status must be a Uint8Array of width × height = ${grid.width * grid.height} values, received ${describe(grid.status)}`);
  }
  for (const key of ['thicknessNm', 'confidence'] as const) {
    const a = grid[key];
    if (!(a instanceof Float32Array)) throw new TypeError(`${name}.${key} must be a Float32Array, received ${a === null ? 'null' : (a as object)?.constructor?.name ?? typeof a}`);
    if (a.length !== grid.width * grid.height) {
      throw new RangeError(`${name}.${key} must have width × height = ${grid.width * grid.height} values, received ${a.length}`);
    }
  }
}

function describe(value: unknown): string {
  if (value === null) return 'null';
  if (value instanceof Uint8Array) return `${value.length} values`;
  return typeof value === 'object' ? (value as object).constructor?.name ?? 'object' : typeof value;
}

/** Index into the grid arrays of original pixel (x, y); pixels past the last full cell clamp to it. */
export function cellIndexOfPixel(grid: ReportGrid, xPx: number, yPx: number): number {
  const cx = Math.min(grid.width - 1, Math.max(0, Math.floor(xPx / grid.step)));
  const cy = Math.min(grid.height - 1, Math.max(0, Math.floor(yPx / grid.step)));
  return cy * grid.width + cx;
}

/** Smallest and largest finite thickness in the grid, or null when there is none. */
export function finiteRange(values: Float32Array): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return lo === Infinity ? null : [lo, hi];
}

/**
 * Thickness down one column of the original image, one sample per grid row: x of each point is
 * the row in original pixels (centre of the cell's block of `step` rows), y the thickness or null.
 */
export function columnProfile(grid: ReportGrid, columnPx: number): Array<[number, number | null]> {
  const cx = Math.min(grid.width - 1, Math.max(0, Math.floor(columnPx / grid.step)));
  const points: Array<[number, number | null]> = [];
  for (let cy = 0; cy < grid.height; cy++) {
    const v = grid.thicknessNm[cy * grid.width + cx];
    points.push([cy * grid.step + (grid.step - 1) / 2, Number.isFinite(v) ? v : null]);
  }
  return points;
}
