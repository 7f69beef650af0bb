/**
 * Piecewise-linear interpolation in a table of (x, y) with strictly increasing x, as asked for by
 * the tabulated optical constants in `shared/materials/SOURCES.md` ("interpolate linearly").
 * Outside the table the end value is held (callers decide whether that is allowed).
 */

/** Binds the table once and returns `(x) => y`. Tables are copied; x must increase strictly. */
export function linearTable(xs: ArrayLike<number>, ys: ArrayLike<number>): (x: number) => number {
  const x = Float64Array.from(xs as ArrayLike<number>);
  const y = Float64Array.from(ys as ArrayLike<number>);
  if (x.length !== y.length || x.length === 0) {
    throw new RangeError(`linearTable: x and y must be non-empty and of equal length, received ${x.length} and ${y.length}`);
  }
  for (let i = 1; i < x.length; i++) {
    if (!(x[i] > x[i - 1])) {
      throw new RangeError(`linearTable: x must increase strictly, received ${x[i - 1]} then ${x[i]} at index ${i}`);
    }
  }
  const last = x.length - 1;
  return (at: number): number => {
    if (at <= x[0]) return y[0];
    if (at >= x[last]) return y[last];
    let lo = 0;
    let hi = last;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (x[mid] <= at) lo = mid;
      else hi = mid;
    }
    const t = (at - x[lo]) / (x[hi] - x[lo]);
    return y[lo] + t * (y[hi] - y[lo]);
  };
}
