// Flow where it is not measured (docs/methods/forecast.md 11.3): when a transect's current station has no valid
// ensemble, the fitted flow model gives the velocity from the offshore wave height and the station's depth,
// so the budget can go on (the processor flags those windows 3 with the reason `modelled_flow`, for at most
// the configured number of hours). The models are those of the daily refit, refreshed here when older than a day.
import { latest } from './blocks.js';
import type { ForecastState } from './state.js';
import { predictFlow, type FlowModel } from './flow-model.js';
import type { ForecastPlan } from './plan.js';
import { refitModels } from './refit.js';
import { DEFAULT_FORECAST_OPTIONS } from './schedule.js';

export interface ModelledFlow {
  /** Velocity along the transect, m/s, and the sd of its ln (the model's scatter and its parameters). */
  uMS: number;
  lnSigma: number;
  hm0OffshoreM: number;
  depthM: number;
  model: FlowModel;
  /** The inputs lie outside the ranges the model was fitted on (by more than 5 % in depth, 20 % in Hm0). */
  extrapolated: boolean;
}

/** Margins (in ln) around the fitted ranges within which a prediction is not an extrapolation. */
const DEPTH_MARGIN_LN = Math.log(1.05);
const HM0_MARGIN_LN = Math.log(1.2);

function outside(x: number, [lo, hi]: [number, number], marginLn: number): boolean {
  return Math.log(x) < Math.log(lo) - marginLn || Math.log(x) > Math.log(hi) + marginLn;
}

/** End (ms) of the last 15-minute block of valid ensembles of a transect that started before tMs, if any in
 * the kept history: where measured flow stopped, for the limit on how long a model may stand in for it. */
export function measuredFlowUntil(s: ForecastState, transect: string, tMs: number): number | undefined {
  const b = s.flowU[transect];
  if (!b) return undefined;
  for (let i = b.k.length - 1; i >= 0; i--) {
    const start = (b.k[i] as number) * b.blockMs;
    if (start < tMs) return start + b.blockMs;
  }
  return undefined;
}

/** The modelled velocity of a transect at tMs from the last three hours' offshore Hm0 and the last hour's
 * depth at its current station (or the values given), or undefined without a model or inputs. */
export function modelledFlow(
  s: ForecastState,
  plan: ForecastPlan,
  transect: string,
  tMs: number,
  inputs: { hm0OffshoreM?: number; depthM?: number } = {},
): ModelledFlow | undefined {
  if (s.fits === null || tMs - s.fits.fittedAtMs >= 24 * 3_600_000 || tMs < s.fits.fittedAtMs)
    s.fits = refitModels(s, plan, tMs, DEFAULT_FORECAST_OPTIONS);
  const model = s.fits.flow[transect];
  const t = plan.transects.find((x) => x.id === transect);
  if (!model || !t) return undefined;
  const hm0 = inputs.hm0OffshoreM ?? latest(s.offshore, tMs, 3 * 3_600_000);
  const depth = inputs.depthM ?? (s.depth[t.current] && latest(s.depth[t.current]!, tMs, 3_600_000));
  if (hm0 === undefined || depth === undefined) return undefined;
  const p = predictFlow(model, hm0, depth);
  return {
    uMS: p.uMS,
    lnSigma: Math.hypot(p.paramSdLn, p.residualSdLn),
    hm0OffshoreM: hm0,
    depthM: depth,
    model,
    extrapolated:
      (model.terms.depth && outside(depth, model.depthRangeM, DEPTH_MARGIN_LN)) ||
      (model.terms.wave && outside(hm0, model.hm0RangeM, HM0_MARGIN_LN)),
  };
}
