// Public API of the seawater library (science spec 2). Other code imports only this file.

export { vapourPressureAtm } from './vapour.js';
export { densityEos80, densityEos80T68 } from './density.js';
export { gravity, depthFromPressure, depthUnesco, G_STANDARD } from './gravity.js';
export {
  MG_L_TO_UMOL_L,
  ML_L_TO_UMOL_L,
  OPTODE_SALINITY_FITS,
  mgLToUmolKg,
  o2SaturationPct,
  o2SolubilityAtPressureUmolKg,
  o2SolubilityUmolKg,
  recompensateO2Salinity,
  scaledTemperature,
  umolKgToMgL,
  umolKgToUmolL,
  umolLToUmolKg,
  type OptodeSalinityFit,
} from './oxygen.js';
