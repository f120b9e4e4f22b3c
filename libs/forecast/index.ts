// Public API of the forecast library: harmonic tides, the fitted flow model, the one-box budget, tonight's
// oxygen and its schedule (docs/methods/forecast.md). Other code imports only this file.

export {
  CONSTITUENTS,
  TIDE_EPOCH_MS,
  fitTide,
  predictTide,
  selectConstituents,
  type Constituent,
  type ConstituentName,
  type TideFit,
  type TideFitOptions,
  type TideFitResult,
} from './harmonics.js';
export {
  fitFlowModel,
  predictFlow,
  type FlowFitOptions,
  type FlowModel,
  type FlowModelResult,
  type FlowSample,
} from './flow-model.js';
export {
  fitBoxModel,
  stepBox,
  O2_MG_L_PER_MMOL_M3,
  type BoxFitOptions,
  type BoxModel,
  type BoxModelResult,
  type BoxSample,
} from './box-model.js';
export { haltonNormals, normalCdf, normalQuantile, quantile, vanDerCorput } from './qmc.js';
export {
  forecastNight,
  type BoxStationModel,
  type FlowSource,
  type NightInput,
  type PersistenceModel,
  type StationForecast,
  type StationModel,
  type TransectModel,
} from './night.js';
export { planFromConfig, type ForecastPlan, type PlanStation, type PlanTransect } from './plan.js';
export {
  createForecastState,
  observeOxygen,
  observeDepth,
  observeOffshoreWaves,
  observePar,
  observeCurrent,
  observeRespiration,
  FORECAST_STATE_VERSION,
  type ForecastState,
  type ForecastError,
  type IssuedForecast,
  type ModelFits,
} from './state.js';
export { refitModels, type RefitOptions } from './refit.js';
export { issueAt, type CalibratedForecast, type IssueOptions } from './issue.js';
export { calibration, studentT90 } from './calibration.js';
export { stepForecast, DEFAULT_FORECAST_OPTIONS, type ForecastOptions, type StepResult } from './schedule.js';
export { toForecastRecord, type ForecastRecord } from './record.js';
export { measuredFlowUntil, modelledFlow, type ModelledFlow } from './modelled-flow.js';
