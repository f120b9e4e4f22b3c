// Public API of the seawater library (docs/methods/seawater.md 2). Other code imports only this file.

export { densityEos80 } from './density.js';
export { depthFromPressure, gravity, STANDARD_GRAVITY, unescoDepth } from './depth.js';
export type { GarciaGordonCoefficients } from './oxygen.js';
export {
  GG92_BK_ML_L,
  GG92_BK_UMOL_KG,
  GG92_COMBINED_ML_L,
  O2_MOLAR_MASS,
  o2MgLFromUmolKg,
  o2MgLFromUmolL,
  o2SatPct,
  o2SolubilityAtPressureUmolKg,
  o2SolubilityMlL,
  o2SolubilityUmolKg,
  o2UmolKgFromMgL,
  o2UmolKgFromSatPct,
  o2UmolKgFromUmolL,
  o2UmolLFromMgL,
  o2UmolLFromMlL,
  o2UmolLFromUmolKg,
  recompensateO2Salinity,
  scaledTemperature,
  UMOL_PER_ML_O2,
} from './oxygen.js';
export { vapourPressureAtm } from './vapour.js';
