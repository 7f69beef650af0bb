/** Public API of the optics engine (re-exports only). */
export * from './types.js';
export { sellmeier, type SellmeierCoefficients } from './dispersion/sellmeier.js';
export { cauchy, type CauchyCoefficients } from './dispersion/cauchy.js';
export { gasFormula, type GasFormulaCoefficients } from './dispersion/gasFormula.js';
export { linearTable } from './dispersion/linearTable.js';
export { makeMaterial, constantMaterial, scaleMaterialIndex, type MaterialOptions, type MaterialParts } from './material.js';
export { DataFileError } from './dataFileError.js';
export { materialFromRecord } from './materialRecord.js';
export { parseNkCsv, materialFromNkTable, type NkTable } from './materialTable.js';
export { glycerolWaterMaterial } from './glycerolWater.js';
export { getMaterial, listMaterialNames, isMaterialName, materialLibrary } from './materialLibrary.js';
export { loadMaterialFile } from './materialFile.js';
export { stackPresets, listStackPresetNames, isStackPresetName, presetStack, type StackPresetName } from './presets.js';
export { loadStackFile, materialFromSpec } from './stackFile.js';
export { resolveStack, resolveFilmMaterial, type StackOverrides } from './resolveStack.js';
export { filmSpectra, type FilmSpectraGrid, type FilmSpectraResult } from './filmSpectra.js';
export { stackSpectrum, type StackSpectrum } from './stackSpectrum.js';
export { airyFilm } from './airyFilm.js';
