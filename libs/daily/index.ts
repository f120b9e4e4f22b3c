// Public API of the daily library: light-response fits, daily metabolic budgets on local days, the sun's
// position, and the robust least squares they share (docs/methods/daily.md). Other code imports only this file.

export { DAILY_ERRORS, DailyError, type DailyErrorCode, type Refusal } from './errors.js';
export {
  weightedLeastSquares,
  invertSpd,
  median,
  madScale,
  type LinearLsq,
  type LinearLsqResult,
} from './lsq.js';
export {
  robustLinearFit,
  huberWeight,
  huberWeights,
  type Loss,
  type RobustFit,
  type RobustFitResult,
  type RobustOptions,
} from './robust.js';
export {
  evalTanh,
  tanhVariance,
  fitTanhCurve,
  fitTanhFixedIk,
  fitProductionLight,
  fitCalcificationLight,
  type LightPoint,
  type LightFit,
  type LightFitOptions,
  type LightFitResult,
  type TanhCurve,
} from './light-response.js';
export {
  fitCalcificationOmega,
  type OmegaPoint,
  type OmegaFit,
  type OmegaFitOptions,
  type OmegaFitResult,
} from './omega.js';
export { createLocalCalendar, nextDate, type LocalCalendar, type LocalDayBounds } from './local-day.js';
export {
  julianDay,
  solarCoordinates,
  greenwichSiderealDeg,
  solarElevationDeg,
  sunEvents,
  nextSunrise,
  isSunDown,
  SUNRISE_ALTITUDE_DEG,
  CIVIL_TWILIGHT_ALTITUDE_DEG,
  type SunEvent,
} from './sun.js';
export { buildSlots, type FluxWindowInput, type Slot, type SlotOptions } from './slots.js';
export {
  closeDay,
  fitWindows,
  type DailyOptions,
  type DailyResult,
  type DailyValue,
  type FillSource,
  type FitSet,
} from './close-day.js';
export { createDailyState, addWindow, closeDueDays, DAILY_STATE_VERSION, type DailyState } from './state.js';
export { toDailyRecord, type DailyRecord } from './record.js';
