// Public API of libs/calibration: the calibration file, applying it to messages, and fitting it from bottles
// (docs/methods/calibration.md 13).
export {
  CALIBRATABLE_FIELDS,
  calibrationEntrySchema,
  calibrationFileSchema,
  checkCalibration,
  formatCalibrationProblem,
  parseCalibrationText,
  type CalibrationEntry,
  type CalibrationEntryInput,
  type CalibrationParse,
  type CalibrationProblem,
} from './schema.js';
export {
  applyCalibration,
  compileCalibration,
  correctValue,
  createCalibrationState,
  daysOf,
  type AppliedCalibration,
  type CalibrationState,
  type CalibrationTable,
  type CompiledCorrection,
} from './apply.js';
export {
  fitOptodeGain,
  fitPco2,
  medianWithin,
  pco2Reference,
  type FitOptions,
  type FitParam,
  type FitResult,
  type FitRow,
  type FitTarget,
  type Pair,
  type Pco2Bottle,
} from './fit.js';
export { BISQUARE_C, median, repeatedMedian, robustLine, robustLocation, type LineFit } from './robust.js';
export { formatCalibrationYaml } from './format.js';
export { CALIBRATION_ERRORS, type CalibrationErrorCode } from './errors.js';
