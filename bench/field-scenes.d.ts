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
