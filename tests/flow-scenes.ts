/**
 * Synthetic scenes for the flow tests (invented data, a scenario of our own): a textured
 * "thickness" field (a sum of plane waves, wavelengths 10–120 px, about a 600 nm mean) sampled at
 * exact positions, so a second frame moved by any known motion is exact, with no resampling.
 * This is the classic synthetic test of optical flow (a translating or rotating textured image
 * with known flow, e.g. Barron, Fleet & Beauchemin 1994, IJCV 12:43–77, section 4.1, from memory).
 */
export interface FlowScene {
  readonly width: number;
  readonly height: number;
  readonly first: Float32Array;
  readonly second: Float32Array;
  readonly uTrue: Float32Array;
  readonly vTrue: Float32Array;
}

export function texture(seed = 7): (x: number, y: number) => number {
  let s = seed;
  const rnd = (): number => (s = (s * 16807) % 2147483647) / 2147483647;
  const waves: Array<[number, number, number, number]> = [];
  for (let k = 0; k < 12; k++) {
    const lambda = 10 * Math.pow(12, rnd());
    const theta = 2 * Math.PI * rnd();
    waves.push([(Math.cos(theta) * 2 * Math.PI) / lambda, (Math.sin(theta) * 2 * Math.PI) / lambda, 2 * Math.PI * rnd(), 20 + 20 * rnd()]);
  }
  return (x, y) => {
    let h = 600;
    for (const [kx, ky, ph, a] of waves) h += a * Math.sin(kx * x + ky * y + ph);
    return h;
  };
}

/**
 * `motion(x, y)` gives, for a point (x, y) of the first frame, where it is in the second; the
 * second frame is the first carried by that motion (inverted numerically) plus `changeNm`.
 */
export function movedScene(width: number, height: number, motion: (x: number, y: number) => [number, number], inverse: (x: number, y: number) => [number, number], changeNm = 0, seed = 7): FlowScene {
  const tex = texture(seed);
  const n = width * height;
  const first = new Float32Array(n);
  const second = new Float32Array(n);
  const uTrue = new Float32Array(n);
  const vTrue = new Float32Array(n);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      first[i] = tex(x, y);
      const [sx, sy] = inverse(x, y);
      second[i] = tex(sx, sy) + changeNm;
      const [mx, my] = motion(x, y);
      uTrue[i] = mx - x;
      vTrue[i] = my - y;
    }
  }
  return { width, height, first, second, uTrue, vTrue };
}

export function translation(width: number, height: number, uPx: number, vPx: number, changeNm = 0): FlowScene {
  return movedScene(width, height, (x, y) => [x + uPx, y + vPx], (x, y) => [x - uPx, y - vPx], changeNm);
}

/** Solid rotation by `angleRad` (counter-clockwise on screen is negative, y points down) about (cx, cy). */
export function rotation(width: number, height: number, angleRad: number, cx: number, cy: number, changeNm = 0): FlowScene {
  const c = Math.cos(angleRad);
  const s = Math.sin(angleRad);
  return movedScene(
    width, height,
    (x, y) => [cx + c * (x - cx) - s * (y - cy), cy + s * (x - cx) + c * (y - cy)],
    (x, y) => [cx + c * (x - cx) + s * (y - cy), cy - s * (x - cx) + c * (y - cy)],
    changeNm,
  );
}

/** Cells at least `marginPx` from the border whose destination also is. */
export function interiorMask(scene: FlowScene, marginPx: number): Uint8Array {
  const { width, height, uTrue, vTrue } = scene;
  const mask = new Uint8Array(width * height);
  for (let y = marginPx; y < height - marginPx; y++) {
    for (let x = marginPx; x < width - marginPx; x++) {
      const i = y * width + x;
      const X = x + uTrue[i];
      const Y = y + vTrue[i];
      mask[i] = X >= marginPx && X <= width - 1 - marginPx && Y >= marginPx && Y <= height - 1 - marginPx ? 1 : 0;
    }
  }
  return mask;
}
