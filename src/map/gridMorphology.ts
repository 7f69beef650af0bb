/**
 * Binary morphology and connected components on a row-major grid of cells (the mapper's cell
 * grid): square erosion and dilation by running counts (separable, O(cells) whatever the radius),
 * and component labelling by flood fill with an explicit typed-array stack.
 */

/** Dilation by a (2r+1)² square: out = 1 where any cell of the square around it is set. */
export function dilateSquare(mask: Uint8Array, width: number, height: number, radius: number): Uint8Array {
  return squareFilter(mask, width, height, radius, false);
}

/** Erosion by a (2r+1)² square: out = 1 where every cell of the square (inside the grid) is set. */
export function erodeSquare(mask: Uint8Array, width: number, height: number, radius: number): Uint8Array {
  return squareFilter(mask, width, height, radius, true);
}

function squareFilter(mask: Uint8Array, width: number, height: number, radius: number, erode: boolean): Uint8Array {
  const out = new Uint8Array(width * height);
  if (radius <= 0) {
    out.set(mask);
    return out;
  }
  // Horizontal pass: count of set cells in the window; then vertical pass over those counts.
  const rows = new Uint16Array(width * height);
  const span = new Uint16Array(width * height);
  for (let y = 0; y < height; y++) {
    const row = y * width;
    let sum = 0;
    for (let x = 0; x < Math.min(radius, width); x++) sum += mask[row + x];
    for (let x = 0; x < width; x++) {
      if (x + radius < width) sum += mask[row + x + radius];
      if (x - radius - 1 >= 0) sum -= mask[row + x - radius - 1];
      rows[row + x] = sum;
      span[row + x] = Math.min(width - 1, x + radius) - Math.max(0, x - radius) + 1;
    }
  }
  for (let x = 0; x < width; x++) {
    let sum = 0;
    let cells = 0;
    for (let y = 0; y < Math.min(radius, height); y++) {
      sum += rows[y * width + x];
      cells += span[y * width + x];
    }
    for (let y = 0; y < height; y++) {
      if (y + radius < height) {
        sum += rows[(y + radius) * width + x];
        cells += span[(y + radius) * width + x];
      }
      if (y - radius - 1 >= 0) {
        sum -= rows[(y - radius - 1) * width + x];
        cells -= span[(y - radius - 1) * width + x];
      }
      out[y * width + x] = erode ? (sum === cells ? 1 : 0) : sum > 0 ? 1 : 0;
    }
  }
  return out;
}

export interface Components {
  /** Per cell: component id (1…count), 0 where the mask is not set. */
  readonly labels: Int32Array;
  readonly count: number;
  /** Cells per component, indexed by id (index 0 unused). */
  readonly sizes: Int32Array;
  /** First cell (row-major) of each component, indexed by id (index 0 unused). */
  readonly first: Int32Array;
}

/**
 * Connected components of the set cells, 4- or 8-connected. `joins(a, b)`, when given, must
 * also hold for two neighbouring set cells to be joined (e.g. their thicknesses continue).
 */
export function labelComponents(
  mask: Uint8Array,
  width: number,
  height: number,
  connectivity: 4 | 8,
  joins?: (a: number, b: number) => boolean,
): Components {
  const cells = width * height;
  const labels = new Int32Array(cells);
  const stack = new Int32Array(cells);
  const sizes: number[] = [0];
  const first: number[] = [0];
  let count = 0;
  for (let seed = 0; seed < cells; seed++) {
    if (!mask[seed] || labels[seed] !== 0) continue;
    const id = ++count;
    first.push(seed);
    let top = 0;
    stack[top++] = seed;
    labels[seed] = id;
    let size = 0;
    while (top > 0) {
      const i = stack[--top];
      size++;
      const x = i % width;
      const y = (i - x) / width;
      for (let dy = -1; dy <= 1; dy++) {
        const ny = y + dy;
        if (ny < 0 || ny >= height) continue;
        for (let dx = -1; dx <= 1; dx++) {
          if (dx === 0 && dy === 0) continue;
          if (connectivity === 4 && dx !== 0 && dy !== 0) continue;
          const nx = x + dx;
          if (nx < 0 || nx >= width) continue;
          const j = ny * width + nx;
          if (!mask[j] || labels[j] !== 0) continue;
          if (joins && !joins(i, j)) continue;
          labels[j] = id;
          stack[top++] = j;
        }
      }
    }
    sizes.push(size);
  }
  return { labels, count, sizes: Int32Array.from(sizes), first: Int32Array.from(first) };
}
