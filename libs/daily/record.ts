// The `daily` record (contract extension E3): the contract's fields exactly, then extension fields of our own
// (fits of the sliding week, the calcification curves, the fill bookkeeping). Values are rounded to what the
// method resolves (0.01 mmol m-2 d-1; 1e-4 of a fraction) so records are stable text across platforms.
import type { DailyResult, DailyValue, FitSet } from './close-day.js';

type Field = string | number | boolean | null;

export interface DailyRecord {
  type: 'daily';
  site: string;
  transect: string;
  day: string;
  t: string;
  ncp_mmol_m2_d: number | null;
  ncp_mmol_m2_d_sigma: number | null;
  r_mmol_m2_d: number | null;
  r_mmol_m2_d_sigma: number | null;
  gpp_mmol_m2_d: number | null;
  gpp_mmol_m2_d_sigma: number | null;
  nec_mmol_m2_d: number | null;
  nec_mmol_m2_d_sigma: number | null;
  nec_day_mmol_m2_d: number | null;
  nec_day_mmol_m2_d_sigma: number | null;
  nec_night_mmol_m2_d: number | null;
  nec_night_mmol_m2_d_sigma: number | null;
  coverage: number;
  gap_filled: number;
  pmax_mmol_m2_h: number | null;
  ik_umol_m2_s: number | null;
  valid: boolean;
  /** Extension fields (see libs/daily/README.md). */
  [extension: string]: Field;
}

const round = (x: number | null, dp: number): number | null =>
  x === null || !Number.isFinite(x) ? null : Math.round(x * 10 ** dp) / 10 ** dp;
const v2 = (v: DailyValue) => round(v.value, 2);
const s2 = (v: DailyValue) => round(v.sigma, 2);

function fitFields(prefix: string, f: FitSet): Record<string, Field> {
  const out: Record<string, Field> = {};
  if (f.ncp.ok) {
    out[`${prefix}pmax_mmol_m2_h`] = round(f.ncp.curve.amp, 3);
    out[`${prefix}pmax_mmol_m2_h_sigma`] = round(f.ncp.se.amp, 3);
    out[`${prefix}ik_umol_m2_s`] = round(f.ncp.curve.ik, 1);
    out[`${prefix}ik_umol_m2_s_sigma`] = round(f.ncp.se.ik, 1);
    out[`${prefix}r_fit_mmol_m2_h`] = round(f.ncp.curve.intercept, 3);
    out[`${prefix}r_fit_mmol_m2_h_sigma`] = round(f.ncp.se.intercept, 3);
  } else out[`${prefix}ncp_fit_refused`] = f.ncp.code;
  if (f.nec.ok) {
    out[`${prefix}gmax_mmol_m2_h`] = round(f.nec.curve.amp, 3);
    out[`${prefix}gmax_mmol_m2_h_sigma`] = round(f.nec.se.amp, 3);
    out[`${prefix}ik_nec_umol_m2_s`] = round(f.nec.curve.ik, 1);
    out[`${prefix}ik_nec_umol_m2_s_sigma`] = round(f.nec.se.ik, 1);
    out[`${prefix}g0_mmol_m2_h`] = round(f.nec.curve.intercept, 3);
    out[`${prefix}g0_mmol_m2_h_sigma`] = round(f.nec.se.intercept, 3);
  } else out[`${prefix}nec_fit_refused`] = f.nec.code;
  if (f.omega.ok) {
    out[`${prefix}nec_omega_slope`] = round(f.omega.slopeMmolM2HPerOmega, 3);
    out[`${prefix}nec_omega_slope_sigma`] = round(f.omega.se.slope, 3);
    out[`${prefix}omega0`] = round(f.omega.omega0, 3);
    out[`${prefix}omega0_sigma`] = round(f.omega.se.omega0, 3);
  } else out[`${prefix}omega_fit_refused`] = f.omega.code;
  return out;
}

/** The record of a closed day. */
export function toDailyRecord(site: string, transect: string, r: DailyResult): DailyRecord {
  const dayFit = r.day.ncp.ok ? r.day.ncp : undefined;
  const ext = { ...fitFields('', r.day), ...fitFields('week_', r.week) };
  // The contract's pmax/ik are the day fit's; its sigmas and R stay among the extension fields.
  delete ext.pmax_mmol_m2_h;
  delete ext.ik_umol_m2_s;
  return {
    ...ext,
    type: 'daily',
    site,
    transect,
    day: r.bounds.day,
    t: new Date(r.bounds.startMs).toISOString(),
    ncp_mmol_m2_d: v2(r.ncp),
    ncp_mmol_m2_d_sigma: s2(r.ncp),
    r_mmol_m2_d: v2(r.r),
    r_mmol_m2_d_sigma: s2(r.r),
    gpp_mmol_m2_d: v2(r.gpp),
    gpp_mmol_m2_d_sigma: s2(r.gpp),
    nec_mmol_m2_d: v2(r.nec),
    nec_mmol_m2_d_sigma: s2(r.nec),
    nec_day_mmol_m2_d: v2(r.necDay),
    nec_day_mmol_m2_d_sigma: s2(r.necDay),
    nec_night_mmol_m2_d: v2(r.necNight),
    nec_night_mmol_m2_d_sigma: s2(r.necNight),
    coverage: round(r.coverage, 4) as number,
    gap_filled: round(r.gapFilled, 4) as number,
    pmax_mmol_m2_h: dayFit ? round(dayFit.curve.amp, 3) : null,
    ik_umol_m2_s: dayFit ? round(dayFit.curve.ik, 1) : null,
    valid: r.valid,
    p_r_ratio: round(r.pr.value, 3),
    p_r_ratio_sigma: round(r.pr.sigma, 3),
    interpolated: round(r.interpolated, 4),
    nec_coverage: round(r.necCoverage, 4),
    nec_gap_filled: round(r.necGapFilled, 4),
    night_windows: r.nightSlots,
    day_hours: r.bounds.hours,
    r_mmol_m2_h: round(r.rHourly.value, 3),
    r_mmol_m2_h_sigma: round(r.rHourly.sigma, 3),
    r_source: r.rSource,
    fill_curve: r.fillCurve,
    nec_fill_curve: r.necFillCurve,
    invalid_reasons: r.invalidReasons.join(','),
  };
}
