// Public API of the currents library: depth-averaged currents from a 4-beam Janus ADCP ensemble
// (reefd docs/methods/currents.md). Conventions: transforms.ts (beams, attitude), sensor-attitude.ts
// (declination, down-looking heads), reef-frame.ts (u, v, direction), README.md (all of them).
export { processEnsemble } from './process.js';
export {
  janusHead,
  beamToInstrument,
  beamToInstrument3,
  instrumentToBeam,
  rotationMatrix,
  instrumentToEarth,
  earthToInstrument,
  gimbalPitchDeg,
  totalTiltDeg,
  type JanusHead,
  type AttitudeDeg,
} from './transforms.js';
export { sensorRotationMatrix, sensorTiltDeg } from './sensor-attitude.js';
export {
  binRangeM,
  binHeightM,
  boundaryDistanceM,
  sideLobeMaxRangeM,
  depthFromPressureM,
} from './geometry.js';
export { depthAverage, type DepthMean } from './depth-average.js';
export { toReefFrame, directionTowardsDeg, logLawCd, bedStressPa, type ReefVelocity } from './reef-frame.js';
export { synthesizeBeamEnsemble, type SynthesisSpec } from './synthesize.js';
export { CURRENT_ERRORS, CURRENT_FAILS, type CurrentErrorCode, type CurrentFailCode } from './errors.js';
export {
  DEFAULT_QC,
  type AdcpEnsemble,
  type AdcpQcThresholds,
  type AdcpSensorConfig,
  type CurrentContext,
  type CurrentOk,
  type CurrentFail,
  type CurrentResult,
} from './types.js';
