// Public API of the metabolism library: community metabolism of a reef flat by the Eulerian control-volume
// method (docs/methods/metabolism.md; docs/methods/uncertainty.md 9.2; docs/contract-v1.md `flux`). Other
// code imports only this file.

export type {
  AirSeaTerms,
  FluxResult,
  InvalidReason,
  InverseState,
  QcFlag,
  StationWindowMean,
  TaSource,
  TransectParams,
  TransectParamsInput,
  TransectWindow,
} from './types.js';
export { DEFAULT_TRANSECT_PARAMS, makeTransectParams } from './types.js';
export { computeTransectFlux, type ComputeFluxOptions } from './transect-flux.js';
export {
  forwardDownstream,
  type ForwardAirSea,
  type ForwardInput,
  type ForwardResult,
  type ForwardStation,
} from './forward.js';
export {
  advectionRate,
  benthicFluxUmolM2S,
  fluxSigmaUmolM2S,
  forwardSteady,
  forwardWithStorage,
  storageFraction,
  storageRate,
  UMOL_M2_S_TO_MMOL_M2_H,
  type FluxSigmaInput,
} from './budget.js';
export {
  airSeaCo2FluxUmolM2S,
  airSeaO2FluxUmolM2S,
  CM_H_TO_M_S,
  gasTransferVelocity,
  gasTransferVelocityCurrent,
  k660CmH,
  schmidtNumber,
  W14_COEFF,
  WIND_POWER_LAW_EXPONENT,
  windAt10m,
  type Gas,
} from './gas-exchange.js';
export { airSeaFluxes, pathMeanWeight, type AirSeaFluxes, type AirSeaInput } from './air-sea.js';
export {
  brent,
  brentExpanding,
  type BracketedRootResult,
  type BrentOptions,
  type BrentResult,
} from './brent.js';
export {
  inverseNecSigma,
  inverseNecSigmaSplit,
  inverseResidual,
  solveInverseNec,
  type InverseInput,
  type InverseOptions,
  type InverseResult,
  type InverseSigmaKey,
} from './inverse.js';
export { acrossBearingMS, alongBearingMS, angleOffBearingDeg, defaultCurrentSigmaMS } from './geometry.js';
export {
  windowEndingAt,
  windowMean,
  windowSchedule,
  type WindowBounds,
  type WindowMeanResult,
} from './window-mean.js';
export { METABOLISM_ERRORS, MetabolismError, type MetabolismErrorCode } from './errors.js';
