// Types of bench/light-scenes.js (a plain ES module with JSDoc types) for the TypeScript tests.
import type { FieldScene } from './field-scenes.js';

export declare function soapFilmUnevenLight(seed?: number): Promise<FieldScene>;
export declare function soapFilmPictureStyle(seed?: number): Promise<FieldScene>;
export declare function soapFilmStyledUnevenInFrame(seed?: number): Promise<FieldScene>;
export declare function waferUnevenLight(seed?: number): Promise<FieldScene>;
export declare function waferPictureStyle(seed?: number): Promise<FieldScene>;
export declare function waferStyledUnevenOnChuck(seed?: number): Promise<FieldScene>;
export declare const LIGHT_SCENES: Record<
  'soapFilmUnevenLight' | 'soapFilmPictureStyle' | 'soapFilmStyledUnevenInFrame' | 'waferUnevenLight' | 'waferPictureStyle' | 'waferStyledUnevenOnChuck',
  (seed?: number) => Promise<FieldScene>
>;
