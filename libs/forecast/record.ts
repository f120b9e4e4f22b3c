// The `forecast` record (contract extension E3): the contract's fields exactly, then extension fields of our
// own (the model, sunrise, the calibration applied).
import type { CalibratedForecast } from './issue.js';

export interface ForecastRecord {
  type: 'forecast';
  site: string;
  station: string;
  /** Issue time, ISO UTC. */
  t: string;
  o2_min_mg_l: number;
  o2_min_lo_mg_l: number;
  o2_min_hi_mg_l: number;
  /** Expected time of the minimum, ISO UTC, and the hours from the issue to it. */
  t_min: string;
  horizon_h: number;
  /** Extension fields: the model, the end of the night (the forecast covers issue to sunrise), ... */
  model: 'persistence' | 'transect' | 'box';
  sunrise: string;
  lead_h: number;
  bias_mg_l: number;
  model_sigma_mg_l: number;
}

const r = (x: number, dp: number) => Math.round(x * 10 ** dp) / 10 ** dp;

export function toForecastRecord(
  site: string,
  issueMs: number,
  f: CalibratedForecast,
  sunriseMs: number,
  lead: number,
): ForecastRecord {
  return {
    type: 'forecast',
    site,
    station: f.station,
    t: new Date(issueMs).toISOString(),
    o2_min_mg_l: r(f.o2MinMgL, 3),
    o2_min_lo_mg_l: r(f.loMgL, 3),
    o2_min_hi_mg_l: r(f.hiMgL, 3),
    t_min: new Date(f.tMinMs).toISOString(),
    horizon_h: r((f.tMinMs - issueMs) / 3.6e6, 3),
    model: f.kind,
    sunrise: new Date(sunriseMs).toISOString(),
    lead_h: lead,
    bias_mg_l: r(f.biasMgL, 3),
    model_sigma_mg_l: r(f.modelSigmaMgL, 3),
  };
}
