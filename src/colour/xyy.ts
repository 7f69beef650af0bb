/**
 * Chromaticity coordinates: x = X/(X+Y+Z), y = Y/(X+Y+Z) (CIE 15:2004 §7.3), and back.
 * Black (X+Y+Z = 0) has no chromaticity; we return x = y = 0 for it.
 */

export function convertXyzToXyy(xyz: ArrayLike<number>): [number, number, number] {
  const sum = xyz[0] + xyz[1] + xyz[2];
  if (sum === 0) return [0, 0, 0];
  return [xyz[0] / sum, xyz[1] / sum, xyz[1]];
}

export function convertXyyToXyz(xyy: ArrayLike<number>): [number, number, number] {
  const [x, y, luminance] = [xyy[0], xyy[1], xyy[2]];
  if (y === 0) return [0, 0, 0];
  return [(x * luminance) / y, luminance, ((1 - x - y) * luminance) / y];
}
