/**
 * Core types of the optics engine. Conventions used everywhere in `src/optics`:
 * - complex refractive index N = n + i·k with k >= 0 for absorbing media
 *   (time dependence exp(-iωt), so a wave exp(i(N·k0·z - ωt)) decays in +z);
 * - wavelengths are vacuum wavelengths in nm; thicknesses are physical thicknesses in nm;
 * - angles are in radians inside the library (`angleRad`), degrees only at the CLI edge.
 */

export interface ComplexIndex {
  readonly n: number;
  readonly k: number;
}

export interface Material {
  /** Library key, e.g. `water`, or the file path for user materials. */
  readonly name: string;
  readonly description: string;
  /** Citation of the data (paper, DOI) or `user file …`. */
  readonly source: string;
  /** Inclusive range of vacuum wavelengths (nm) over which the data are valid. */
  readonly validRangeNm: readonly [number, number];
  /** Complex index at one vacuum wavelength; throws RangeError outside `validRangeNm`. */
  readonly indexAt: (wavelengthNm: number) => ComplexIndex;
}

export type Polarisation = 's' | 'p' | 'mixed';

export interface Layer {
  readonly material: Material;
  /** Fixed physical thickness (nm), or 'film' for the layer whose thickness is unknown / varied. */
  readonly thicknessNm: number | 'film';
}

export interface Stack {
  /** Preset name or stack-file path, for reports. */
  readonly name: string;
  /** Medium of incidence (light comes from here). */
  readonly ambient: Material;
  /** Coherent layers, from the ambient side down. At least one has thicknessNm 'film'. */
  readonly layers: readonly Layer[];
  /** Semi-infinite substrate (for a free-standing film: the ambient again). */
  readonly substrate: Material;
  /**
   * Optional: the substrate is a thick slab of this thickness whose back surface, facing
   * `exitMedium`, adds its reflection incoherently (e.g. the back of a glass slide).
   * `thicknessMm` (optional) sets the slab thickness for absorption in the substrate; without it
   * the slab is taken as non-absorbing.
   */
  readonly incoherentBack?: { readonly exitMedium: Material; readonly thicknessMm?: number };
}
