// Types of bench/field-scenes.js (a plain ES module with JSDoc types) for the TypeScript tests.
import type { MapOptions } from '../src/map/types.js';

export declare const FIELD_WIDTH: number;
export declare const FIELD_HEIGHT: number;
export declare const GLINT_NOT_FILM: number;
export declare const GLINT_EDGE: number;
export declare const TARGET_COLOURS_SRGB8: readonly (readonly [number, number, number])[];

export interface Surface {
  readonly id: number;
  readonly name: string;
  readonly reflectanceRgb: readonly [number, number, number];
}

export interface FieldScene {
  name: string;
  description: string;
  fileName: string;
  format: 'jpeg' | 'png';
  width: number;
  height: number;
  stack: string;
  light: string;
  angleDeg: number;
  thinBelowNm: number | null;
  exposure: number;
  flare: readonly [number, number, number];
  noiseSigma: number;
  truthNm: Float32Array;
  film: Uint8Array;
  edge: Uint8Array;
  labels: Uint8Array;
  mixed: Uint8Array;
  surfaces: Surface[];
  rgb: Uint8Array;
  photo: Buffer;
  mapOptions: Partial<MapOptions>;
  variants?: { name: string; mapOptions: Partial<MapOptions> }[];
}

export interface FieldSeries {
  name: string;
  frames: FieldScene[];
  ruptureIndex: number | null;
  lastFilmIndex: number;
}

export declare function valueNoise(seed: number, cellX: number, cellY: number): (x: number, y: number) => number;
export declare function fractalNoise(seed: number, cellX: number, cellY: number, octaves: number): (x: number, y: number) => number;
export declare function soapFilmThicknessNm(u: number, v: number, stage: number, wobble: number, grain: number): number;
export declare function waferOxideNm(x: number, y: number): number;
export declare function uniformOxideNm(x: number, y: number): number;
export declare function soapFilmInFrame(seed?: number): Promise<FieldScene>;
export declare function soapFilmOffBorder(seed?: number): Promise<FieldScene>;
export declare function soapFilmWithGlint(seed?: number): Promise<FieldScene>;
export declare function waferOnDarkChuck(seed?: number): Promise<FieldScene>;
export declare function waferOnGreyBench(seed?: number): Promise<FieldScene>;
export declare function uniformCoating(seed?: number): Promise<FieldScene>;
export declare function greyCard(seed?: number): Promise<FieldScene>;
export declare function colourTarget(seed?: number): Promise<FieldScene>;
export declare function noise(seed?: number): Promise<FieldScene>;
export declare function burstingSeries(frames?: number, burstAt?: number, seed?: number): Promise<FieldSeries>;
export declare function blackFilmGrowingSeries(frames?: number, stageMax?: number, seed?: number, shiftY?: number): Promise<FieldSeries>;
export declare const FIELD_SCENES: Record<
  'soapFilmInFrame' | 'soapFilmOffBorder' | 'waferOnDarkChuck' | 'waferOnGreyBench' | 'soapFilmWithGlint' | 'greyCard' | 'colourTarget' | 'noise' | 'uniformCoating',
  (seed?: number) => Promise<FieldScene>
>;
export declare function mapOptionsFor(
  scene: Pick<FieldScene, 'stack' | 'light' | 'angleDeg' | 'thinBelowNm' | 'mapOptions'>,
  extra?: Partial<MapOptions>,
): MapOptions;
export declare function truthFractions(scene: Pick<FieldScene, 'film' | 'truthNm' | 'thinBelowNm'>): {
  filmPx: number;
  filmFraction: number;
  thinFraction: number | null;
};

// Building blocks, exported for bench/light-scenes.js (the same invented scenes under camera effects).
import type { PictureStyle, UnevenLight } from './camera-effects.js';

export interface SceneEffects {
  unevenLight?: UnevenLight | null;
  pictureStyle?: PictureStyle | null;
}
export interface FieldScene {
  /** Truth of the uneven light applied (bench/camera-effects.js), null when evenly lit. */
  unevenLight?: UnevenLight | null;
  /** Truth of the picture style applied, null when none. */
  pictureStyle?: PictureStyle | null;
}
export interface Canvas {
  exposure: number;
  linear: Float32Array;
  filmWeight: Float32Array;
  glint: Float32Array;
  labels: Uint8Array;
  mixed: Uint8Array;
  surfaces: Surface[];
}
export interface SurfaceTexture {
  readonly mean: readonly [number, number, number];
  at(x: number, y: number, rho: Float64Array): void;
}
export declare const FRAME: { cx: number; hw: number; hh: number; cornerPx: number; wirePx: number; tiltRad: number };
export declare const WAFER: { cx: number; cy: number; radiusPx: number; flatFromCentrePx: number };
type StackSettings = { stack: string; light: string; angleDeg: number; thinBelowNm: number | null; flare: readonly [number, number, number]; noiseSigma: number };
export declare const SOAP: StackSettings;
export declare const OXIDE: StackSettings;
export declare function coverage(sdPx: number): number;
export declare function rotate(x: number, y: number, cx: number, cy: number, angleRad: number, out: Float64Array): void;
export declare function createCanvas(exposure: number): Canvas;
export declare function paintSurface(
  canvas: Canvas,
  name: string,
  meanReflectanceRgb: readonly [number, number, number],
  alphaAt: (x: number, y: number) => number,
  reflectanceAt: (x: number, y: number, rho: Float64Array) => void,
): number;
export declare function paintFilm(canvas: Canvas, alphaAt: (x: number, y: number) => number, filmLinear: Float32Array): void;
export declare function addGlint(canvas: Canvas, cx: number, cy: number, radiusPx: number, haloPx: number, haloPeak: number): void;
export declare function renderFilmLinear(fieldNm: Float32Array, stackName: string, lightName: string, angleDeg: number, exposure: number): Float32Array;
export declare function finishScene(
  canvas: Canvas,
  fieldNm: Float32Array | null,
  spec: Omit<FieldScene, 'truthNm' | 'film' | 'edge' | 'labels' | 'mixed' | 'surfaces' | 'rgb' | 'photo' | 'width' | 'height' | 'format' | 'fileName' | 'unevenLight' | 'pictureStyle'> & {
    format?: 'jpeg' | 'png';
    fileName?: string;
    seed: number;
    effects?: SceneEffects;
  },
): Promise<FieldScene>;
export declare function darkCloth(seed: number): SurfaceTexture;
export declare function greyBench(seed: number, base: number): SurfaceTexture;
export declare function darkChuck(seed: number, cx: number, cy: number): SurfaceTexture;
export declare function soapFrameCanvas(o: { shiftY: number; stage: number; withFilm: boolean; seed: number; droplets?: boolean }): { canvas: Canvas; fieldNm: Float32Array | null };
export declare function paintWafer(canvas: Canvas, thicknessAt: (x: number, y: number) => number): Float32Array;
export declare function paintTweezers(canvas: Canvas, bench: SurfaceTexture, seed: number): () => void;
