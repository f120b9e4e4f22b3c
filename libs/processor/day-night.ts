// The processor's daily and nightly steps together (daily-step.ts, forecast-step.ts): one forecast plan from
// the configuration, built once (not part of the state), shared by both.
import type { ReefdConfig } from '../contract/index.js';
import { planFromConfig, type ForecastPlan } from '../forecast/index.js';
import { createDailyStep, type DailyStep } from './daily-step.js';
import { createForecastStep, type ForecastStep } from './forecast-step.js';
import type { Observer } from './observe.js';
import type { ProcessorState } from './state.js';

export interface DayNight {
  daily: DailyStep;
  forecast: ForecastStep;
}

export interface DayNightOptions {
  /** The site's forecast plan (a re-derivation's core, of part of the site, keeps the site's). */
  plan?: ForecastPlan;
  /**
   * A re-derivation's scratch core (revise.ts): the forecast's state follows the replay (its fits bridge the
   * same gaps), but no `forecast` record is sent.
   */
  scratch?: boolean;
}

export function createDayNight(
  config: ReefdConfig,
  state: ProcessorState,
  observer: Observer,
  o: DayNightOptions = {},
): DayNight {
  const plan = o.plan ?? planFromConfig(config);
  return {
    daily: createDailyStep(config, state, plan, observer),
    forecast: createForecastStep(config, state, plan, observer, o.scratch === true),
  };
}
