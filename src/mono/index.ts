export { mapMonochromatic } from './mapMonochromatic.js';
export { mapLineIntensity, type MonoMapResult, type LineScaleReport } from './mapLineIntensity.js';
export { isMonochromaticLight, checkLineWavelength, narrowestPowerWindow, type SampledSpd } from './isMonochromaticLight.js';
export {
  airyFreeFilmReflectance,
  freeFilmPeakReflectance,
  fresnelAmplitudeNormal,
  scheludkoThicknessNm,
  type ScheludkoOptions,
} from './scheludko.js';
export {
  buildLineReflectanceTable,
  thicknessOnBranch,
  branchOfThickness,
  branchRangeNm,
  type LineReflectanceTable,
} from './lineReflectanceTable.js';
export { stackLineTable, stackReflectanceAtLine, type LineTableOptions } from './stackLineReflectance.js';
export type { MonoPhoto } from './lineIntensity.js';
