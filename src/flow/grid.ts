/**
 * A float grid on the flow's working scales: row-major values, NaN where unknown. The same shape
 * as the thickness grids `lamella series` writes (../io/decodeFloatTiff.ts FloatGrid).
 */
export interface Grid {
  readonly data: Float32Array;
  readonly width: number;
  readonly height: number;
}

export function checkGrid(grid: Grid, name: string): void {
  if (!(grid.data instanceof Float32Array)) throw new TypeError(`${name}.data must be a Float32Array`);
  if (!Number.isInteger(grid.width) || grid.width < 1 || !Number.isInteger(grid.height) || grid.height < 1) {
    throw new RangeError(`${name} must have a whole width and height >= 1, received ${grid.width} × ${grid.height}`);
  }
  if (grid.data.length !== grid.width * grid.height) {
    throw new RangeError(`${name} must hold width × height = ${grid.width * grid.height} values, received ${grid.data.length}`);
  }
}
