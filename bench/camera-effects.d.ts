// Types of bench/camera-effects.js (a plain ES module with JSDoc types) for the TypeScript tests.
export interface UnevenLightSpec {
  readonly falloff: number;
  readonly directionDeg: number;
  readonly steepness: number;
  readonly vignettingLoss: number;
}
export interface UnevenLight extends UnevenLightSpec {
  /** Gain per pixel, row-major, largest value 1. */
  readonly gain: Float32Array;
  readonly focalPx: number;
  readonly width: number;
  readonly height: number;
}
export interface PictureStyle {
  readonly steepness: number;
  readonly pivot: number;
  readonly blend: number;
  readonly saturation: number;
}
export declare const UNEVEN_LIGHT: UnevenLightSpec;
export declare const PICTURE_STYLE: PictureStyle;
export declare function vignettingFocalPx(rCornerPx: number, loss: number): number;
export declare function vignetting(rPx: number, focalPx: number): number;
export declare function falloffAt(t: number, falloff: number, steepness: number): number;
export declare function unevenLight(width: number, height: number, spec: UnevenLightSpec): UnevenLight;
export declare function toneCurve(style: Pick<PictureStyle, 'steepness' | 'pivot' | 'blend'>): (encoded: number) => number;
export declare function applyPictureStyle(curve: (encoded: number) => number, saturation: number, rgb: Float64Array): void;
