// Tonight's oxygen and the fitted flow in the processor (docs/methods/forecast.md 11.7, 11.3): the derived
// records feed the forecast's state as they are made (oxygen, depth, offshore waves, currents, light); after
// each cadence tick the schedule issues what is due (dusk, then hourly until sunrise) as `forecast` records,
// which the built-in rule `low_oxygen_expected` watches; and a transect whose current station has no valid
// ensemble borrows the flow model's velocity for at most `modelled_flow_max_h`. All on event time, and the
// state is part of the processor's checkpoint.
import type { DerivedRecord, ReefdConfig } from '../contract/index.js';
import {
  measuredFlowUntil,
  modelledFlow,
  observeCurrent,
  observeDepth,
  observeOffshoreWaves,
  observeOxygen,
  observePar,
  stepForecast,
  type ForecastPlan,
} from '../forecast/index.js';
import type { FlowFallback } from './flux.js';
import { siteLightSensor } from './light.js';
import type { Observer } from './observe.js';
import type { ProcessorState } from './state.js';

const HOUR = 3_600_000;
/** Fewest valid bins of an ensemble the flow model is fitted on. */
const MIN_FLOW_BINS = 3;

export interface ForecastStep {
  /** Feeds the records one message produced (out[from..]) to the forecast's state. */
  observe(out: readonly DerivedRecord[], from: number): void;
  /** Runs the night schedule up to watermarkMs; `forecast` records (and alerts on them) go to `out`. */
  step(watermarkMs: number, out: DerivedRecord[]): void;
  /** The modelled velocity for a transect's windows without a valid ensemble, within the configured hours. */
  fallback(transect: string): FlowFallback | undefined;
}

const num = (r: DerivedRecord, k: string): number | undefined => {
  const v = (r as unknown as Record<string, unknown>)[k];
  return typeof v === 'number' && Number.isFinite(v) ? v : undefined;
};
/** Flags 1-3: a value the forecast may learn from. */
const usable = (r: DerivedRecord): boolean => {
  const f = num(r, 'flag');
  return f === undefined || f <= 3;
};

export function createForecastStep(
  config: ReefdConfig,
  state: ProcessorState,
  plan: ForecastPlan,
  observer: Observer,
  silent = false,
): ForecastStep {
  const light = siteLightSensor(config);
  const byCurrent = new Map<string, ForecastPlan['transects']>();
  for (const t of plan.transects) byCurrent.set(t.current, [...(byCurrent.get(t.current) ?? []), t]);
  const fallbacks = new Map<string, FlowFallback>();

  function current(r: DerivedRecord & { type: 'current' }, tMs: number): void {
    const east = num(r, 'east_m_s');
    const north = num(r, 'north_m_s');
    const depth = num(r, 'depth_m');
    if (east === undefined || north === undefined || depth === undefined) return;
    // The flow model learns from profiles of at least MIN_FLOW_BINS bins: a depth average from fewer is
    // mostly the near-bed and surface extrapolation (20-35 % fast in the shallow water of the fictional
    // flat), and the model would carry that into every gap it bridges.
    if (num(r, 'bins_used') !== undefined && (num(r, 'bins_used') as number) < MIN_FLOW_BINS) return;
    for (const t of byCurrent.get(r.station) ?? []) {
      const b = (t.bearingDeg * Math.PI) / 180;
      observeCurrent(state.forecast, t.id, tMs, east * Math.sin(b) + north * Math.cos(b), depth);
    }
  }

  function observeOne(r: DerivedRecord): void {
    if (!usable(r)) return;
    const tMs = Date.parse(r.t);
    if (r.type === 'oxygen') {
      const o2 = num(r, 'o2_mg_l');
      if (o2 !== undefined) observeOxygen(state.forecast, r.station, tMs, o2);
    } else if (r.type === 'waves') {
      const depth = num(r, 'depth_m');
      if (depth !== undefined) observeDepth(state.forecast, r.station, tMs, depth);
      const hm0 = num(r, 'hm0_m');
      if (hm0 !== undefined && r.station === plan.offshoreStation)
        observeOffshoreWaves(state.forecast, tMs, hm0);
    } else if (r.type === 'current') {
      current(r, tMs);
    } else if (r.type === 'light' && `${r.station}/${r.sensor}` === light) {
      const par = num(r, 'par_umol_m2_s');
      if (par !== undefined) observePar(state.forecast, tMs, par);
    }
  }

  function makeFallback(transect: string): FlowFallback | undefined {
    const tr = config.transects[transect];
    const t = plan.transects.find((x) => x.id === transect);
    if (tr === undefined || t === undefined || !(tr.modelled_flow_max_h > 0)) return undefined;
    const b = (t.bearingDeg * Math.PI) / 180;
    return (startMs, endMs) => {
      // Only a gap that follows measured flow, for at most the configured hours after it (read from the
      // ensembles before the window, so the decision does not depend on what arrived after it).
      const seen = measuredFlowUntil(state.forecast, transect, startMs);
      if (seen === undefined || endMs - seen > tr.modelled_flow_max_h * HOUR) return undefined;
      // Never beyond the depths and wave heights the model was fitted on: an ADCP that loses its bins at low
      // tide every day leaves a gap no fit has seen (the light responses fill it, docs/methods/daily.md 10.4).
      const m = modelledFlow(state.forecast, plan, transect, endMs);
      if (m === undefined || m.extrapolated || !(m.uMS > 0)) return undefined;
      return {
        eastMS: m.uMS * Math.sin(b),
        northMS: m.uMS * Math.cos(b),
        // First order: the sd of ln u times u.
        sigmaUMS: m.uMS * m.lnSigma,
      };
    };
  }

  return {
    observe(out, from) {
      for (let i = from; i < out.length; i++) observeOne(out[i] as DerivedRecord);
    },
    step(watermarkMs, out) {
      const issued = stepForecast(state.forecast, plan, watermarkMs).records;
      if (silent) return;
      for (const rec of issued) {
        const r = rec as unknown as DerivedRecord;
        out.push(r);
        observer.record(r, undefined, Date.parse(rec.t), 1, out);
      }
    },
    fallback(transect) {
      if (!fallbacks.has(transect)) {
        const f = makeFallback(transect);
        if (f !== undefined) fallbacks.set(transect, f);
      }
      return fallbacks.get(transect);
    },
  };
}
