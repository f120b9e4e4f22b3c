// The fictional reef simulator: a pure model of the reef (tide, waves, flow, light, metabolism, chemistry)
// that turns a configuration, a start time and a seed into contract messages and the truth behind them.
export { simulate, simulateMessages, CADENCE_S } from './generate.js';
export type { SimEvent, SimMessage, SimulateOptions } from './generate.js';
export type { SensorError } from './sensor-errors.js';
export type { TruthRow, StationTruth, TransectTruth, FaultTruth, EventTruth, DailyTruth } from './truth.js';
export { createRng, type Rng } from './prng.js';
export { crossReef, ORNEN_HYDRAULICS, FLAT_CURRENT_RANGE_M_S, CREST_CURRENT_RANGE_M_S } from './hydro.js';
export type { CrossReefInput, CrossReefState, ReefHydraulics } from './hydro.js';
export { ReefModel, type ReefSnapshot, type WaveClimateOverride } from './model.js';
export { siteLayout, roleOf, ROLES, type Role, type SiteLayout } from './site.js';
export { SIMULATOR_ERRORS, type SimulatorErrorCode } from './errors.js';
