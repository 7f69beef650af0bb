/** Public API of calibration (re-exports only). */
export { calibratePhotoFile, calibrateDecoded, type CalibrateOptions, type CalibrationRecord } from './calibrate.js';
export { fitCalibration, CALIBRATION_PARAMETERS, type CalibrationParameter, type CalibrationFitResult } from './fitCalibration.js';
export { knownRegionColours, type KnownRegion, type KnownRegionColour } from './knownRegions.js';
export { readCalibrationFile, loadCalibrationForRun, CALIBRATION_VERSION, type CalibrationForRun } from './calibrationFile.js';
