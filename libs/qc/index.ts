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
  type RepeatLimits,
  type StuckLimits,
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
  spikeLimitsWithFloor,
  rateOfChangeFloor,
  repeatRunNeeded,
  repeatFlag,
  stuckFlag,
} from './tests.js';
export {
  DEFAULT_NOISE_LIMITS,
  noiseScales,
  type NoiseLimits,
  type NoiseProfile,
  type NoiseScales,
} from './noise.js';
export {
  createQcState,
  qcUpdate,
  qcFlush,
  QC_STATE_VERSION,
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
export {
  coLocatedDrift,
  DEFAULT_DRIFT_LIMITS,
  type DriftLimits,
  type DriftResult,
  type TimeSeries,
} from './drift.js';
export {
  newBatteryTrend,
  batteryTrendAdd,
  batteryTrend,
  DEFAULT_BATTERY_TREND,
  type BatteryTrendState,
  type BatteryTrendLimits,
  type BatteryTrend,
} from './battery-trend.js';
export {
  IRREGULAR_KINDS,
  isIrregularKind,
  usualIntervalMs,
  staleLimitMs,
  INTERVALS_KEPT,
  type Cadence,
} from './cadence.js';
export {
  newDeadlineHeap,
  heapPush,
  heapPeek,
  heapPop,
  heapSize,
  type DeadlineHeap,
} from './deadline-heap.js';
export {
  createFaultState,
  faultsOnMessage,
  faultsOnQc,
  faultsOnBattery,
  faultsExternal,
  faultsAdvance,
  faultsRestore,
  activeFaults,
  faultsDuring,
  invalidReasons,
  INVALIDATING_FAULTS,
  DEFAULT_FAULT_OPTIONS,
  type FaultState,
  type FaultOptions,
  type FaultEpisode,
  type FaultChange,
  type SensorFault,
  type QcOutcome,
} from './sensor-faults.js';
export { median, madSd, theilSen, type Line } from './robust.js';
export { QC_ERRORS, type QcErrorCode } from './errors.js';
