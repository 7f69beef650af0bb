// Types of scripts/make-demo.js (a plain ES module) for the TypeScript tests.
export declare const DEMO: {
  readonly fps: number;
  readonly H_TOP: number;
  readonly H_BOTTOM: number;
  readonly TAU: number;
  readonly T_END: number;
  readonly BLACK_NM: number;
  readonly EXPOSURE: number;
  readonly WHITE_BALANCE: readonly [number, number, number];
  readonly FLARE: number;
  readonly NOISE: number;
  readonly THIN_BELOW_NM: number;
  readonly stackOptions: { readonly stack: string };
};
/** The invented film thickness (nm) at time tS on a width×height grid, row-major. */
export declare function demoThickness(tS: number, width: number, height: number): Float32Array;
export declare function renderDemoFrame(
  index: number,
  width: number,
  height: number,
  fps?: number,
): { thicknessNm: Float32Array; image: { data: Uint8Array; width: number; height: number; channels: 3 } };
export declare function truthStats(thicknessNm: Float32Array, thinBelowNm: number): { meanNm: number; minNm: number; thinFraction: number };
