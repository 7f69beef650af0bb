/**
 * Breadth-first growth over the 4-connected pixel grid, shared by the single-line mapper's fills.
 * `queue[0 .. tail)` holds the seeds; each visited pixel p offers its neighbours q (left, right,
 * up, down) to `enter(p, q)`, which marks q and returns true to take it. Returns the final tail:
 * `queue[0 .. tail)` then lists every pixel taken, in visiting order.
 */
export function growBreadthFirst(
  queue: Int32Array,
  tail: number,
  width: number,
  height: number,
  enter: (from: number, to: number) => boolean,
): number {
  let head = 0;
  while (head < tail) {
    const p = queue[head++];
    const x = p % width;
    const y = (p - x) / width;
    if (x > 0 && enter(p, p - 1)) queue[tail++] = p - 1;
    if (x < width - 1 && enter(p, p + 1)) queue[tail++] = p + 1;
    if (y > 0 && enter(p, p - width)) queue[tail++] = p - width;
    if (y < height - 1 && enter(p, p + width)) queue[tail++] = p + width;
  }
  return tail;
}
