// The processor's daily and nightly steps together (daily-step.ts, forecast-step.ts): one forecast plan from
// the configuration, built once (not part of the state), shared by both.
import type { ReefdConfig } from '../contract/index.js';
import { planFromConfig } from '../forecast/index.js';
import { createDailyStep, type DailyStep } from './daily-step.js';
import { createForecastStep, type ForecastStep } from './forecast-step.js';
import type { Observer } from './observe.js';
import type { ProcessorState } from './state.js';

export interface DayNight {
  daily: DailyStep;
  forecast: ForecastStep;
}

export function createDayNight(config: ReefdConfig, state: ProcessorState, observer: Observer): DayNight {
  const plan = planFromConfig(config);
  return {
    daily: createDailyStep(config, state, plan, observer),
    forecast: createForecastStep(config, state, plan, observer),
  };
}
