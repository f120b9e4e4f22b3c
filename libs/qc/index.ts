// Public API of libs/qc: QARTOD-style real-time QC (docs/methods/qc.md), pure and incremental.
export {
  aggregateFlags,
  derivedFlag,
  worseFlag,
  FLAG_PASS,
  FLAG_NOT_EVALUATED,
  FLAG_SUSPECT,
  FLAG_FAIL,
  FLAG_MISSING,
  type QcFlag,
} from './flags.js';
export {
  DEFAULT_QC_LIMITS,
  type Bounds,
  type QcLimits,
  type SpikeLimits,
  type RateOfChangeLimits,
  type FlatLineLimits,
  type AttenuatedLimits,
  type ClimatologyTable,
} from './limits.js';
export {
  grossRange,
  climatology,
  spike,
  rateOfChange,
  attenuatedSignal,
  attenuatedFlag,
  timing,
} from './tests.js';
export {
  createQcState,
  qcUpdate,
  qcFlush,
  type QcState,
  type QcConfig,
  type QcResult,
  type QcFinalized,
  type QcTests,
  type QcTestName,
} from './state.js';
export {
  adcpTilt,
  sensorExposed,
  o2SaturationFault,
  pco2LowFault,
  temperatureAgreement,
  depthAgreement,
  neighbourDifference,
  salinityBubble,
  type CheckResult,
} from './multivariate.js';
export { QC_ERRORS, type QcErrorCode } from './errors.js';
