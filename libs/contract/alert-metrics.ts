// The metrics an alert rule may name: every value the processor feeds the alert engine (libs/processor),
// as `<kind or record type>.<field>`, with its unit and the range a reef station can physically report.
// A rule on a name outside this table would never fire, and a limit outside the range is a unit mistake
// (a low-oxygen limit of 62.5 "mg/L" is a umol/kg number): the configuration refuses both.
//
// Ranges are wide on purpose (common practice: gross-range bounds beyond anything seen on a shallow reef,
// docs/methods/qc.md 7.1 lists the narrower QC limits); they catch unit mistakes, not unusual water.
// Units are the record-type table's (libs/contract/record-types.ts); a test keeps the two in step and
// checks that every numeric record field has its entry here.

import type { Kind } from './ids.js';

export interface MetricSpec {
  /** UDUNITS-style unit, as in the record-type table. */
  unit: string;
  /** Plausible range of the value (and so of any limit on it). */
  min: number;
  max: number;
}

const m = (unit: string, min: number, max: number): MetricSpec => ({ unit, min, max });

const BATTERY = m('V', 0, 60);

/** Raw message values the processor checks before any derivation. */
const RAW: Record<string, MetricSpec> = {
  'ctd.temp_c': m('degC', -5, 45),
  'ctd.sal': m('1', 0, 45),
  'pco2.pco2_uatm': m('uatm', 0, 10_000),
  'par.par_umol_m2_s': m('umol m-2 s-1', 0, 5000),
  'met.wind_m_s': m('m s-1', 0, 100),
  'met.baro_hpa': m('hPa', 800, 1100),
};

/** Numeric fields of the derived records (the alert engine sees every one of them). */
const RECORDS: Record<string, MetricSpec> = {
  'waves.hm0_m': m('m', 0, 20),
  'waves.tp_s': m('s', 0, 300),
  'waves.tm01_s': m('s', 0, 300),
  'waves.tm02_s': m('s', 0, 300),
  'waves.hrms_m': m('m', 0, 20),
  'waves.hm0_ss_m': m('m', 0, 20),
  'waves.hm0_ig_m': m('m', 0, 10),
  'waves.depth_m': m('m', 0, 100),
  'waves.hm0_sigma_m': m('m', 0, 10),
  'current.east_m_s': m('m s-1', -5, 5),
  'current.north_m_s': m('m s-1', -5, 5),
  'current.u_m_s': m('m s-1', -5, 5),
  'current.v_m_s': m('m s-1', -5, 5),
  'current.speed_m_s': m('m s-1', 0, 5),
  'current.dir_to_deg': m('degree', 0, 360),
  'current.bins_used': m('1', 0, 256),
  'current.speed_sigma_m_s': m('m s-1', 0, 5),
  'carbonate.ta_umol_kg': m('umol kg-1', 0, 5000),
  'carbonate.dic_umol_kg': m('umol kg-1', 0, 5000),
  'carbonate.ph_total': m('1', 6, 9),
  'carbonate.pco2_uatm': m('uatm', 0, 10_000),
  'carbonate.co3_umol_kg': m('umol kg-1', 0, 1000),
  'carbonate.omega_ar': m('1', 0, 15),
  'carbonate.omega_ca': m('1', 0, 20),
  'oxygen.o2_umol_kg': m('umol kg-1', 0, 1000),
  'oxygen.o2_sat_pct': m('percent', 0, 400),
  'oxygen.o2_mg_l': m('mg L-1', 0, 30),
  'light.par_umol_m2_s': m('umol m-2 s-1', 0, 5000),
  'flux.ncp_mmol_m2_h': m('mmol m-2 h-1', -1000, 1000),
  'flux.nec_mmol_m2_h': m('mmol m-2 h-1', -500, 500),
  'flux.nec_inverse_mmol_m2_h': m('mmol m-2 h-1', -500, 500),
  'flux.u_m_s': m('m s-1', -5, 5),
  'flux.depth_m': m('m', 0, 100),
  'flux.residence_min': m('min', 0, 10_000),
  'flux.ncp_sigma_mmol_m2_h': m('mmol m-2 h-1', 0, 1000),
  'flux.nec_sigma_mmol_m2_h': m('mmol m-2 h-1', 0, 500),
  'flux.par_umol_m2_s': m('umol m-2 s-1', 0, 5000),
  'daily.coverage': m('1', 0, 1),
  'daily.gap_filled': m('1', 0, 1),
  'daily.pmax_mmol_m2_h': m('mmol m-2 h-1', 0, 1000),
  'daily.ik_umol_m2_s': m('umol m-2 s-1', 0, 5000),
  'forecast.o2_min_mg_l': m('mg L-1', 0, 30),
  'forecast.o2_min_lo_mg_l': m('mg L-1', 0, 30),
  'forecast.o2_min_hi_mg_l': m('mg L-1', 0, 30),
  'forecast.horizon_h': m('h', 0, 48),
};

for (const name of ['ncp', 'r', 'gpp', 'nec', 'nec_day', 'nec_night']) {
  const unit = 'mmol m-2 d-1';
  RECORDS[`daily.${name}_mmol_m2_d`] = m(unit, -10_000, 10_000);
  RECORDS[`daily.${name}_mmol_m2_d_sigma`] = m(unit, 0, 10_000);
}

/** Kinds of the contract whose messages may carry `battery_v` (every kind). */
const KINDS = [
  'ctd',
  'oxygen',
  'pco2',
  'pressure',
  'adcp',
  'par',
  'met',
  'sample',
] as const satisfies readonly Kind[];

export const METRICS: Readonly<Record<string, MetricSpec>> = Object.freeze({
  ...RAW,
  ...RECORDS,
  ...Object.fromEntries(KINDS.map((k) => [`${k}.battery_v`, BATTERY])),
});

/** The plausible range of a supply voltage limit. */
export const BATTERY_RANGE = BATTERY;

/** Why a metric name cannot be used, with the names of its kind or record type; undefined when it can. */
export function unknownMetric(metric: string): string | undefined {
  if (METRICS[metric] !== undefined) return undefined;
  const prefix = metric.slice(0, metric.indexOf('.') + 1);
  const near = Object.keys(METRICS).filter((k) => prefix !== '' && k.startsWith(prefix));
  return near.length > 0
    ? `"${metric}" is not a value reefd computes; ${prefix.slice(0, -1)} has ${near.join(', ')}`
    : `"${metric}" is not a value reefd computes; metrics are <kind or record type>.<field>, e.g. oxygen.o2_mg_l`;
}

/** Why a limit cannot be meant for a metric (outside its plausible range); undefined when it can. */
export function implausibleLimit(metric: string, value: number): string | undefined {
  const spec = METRICS[metric];
  if (spec === undefined || (value >= spec.min && value <= spec.max)) return undefined;
  const unit = spec.unit === '1' ? '' : ` ${spec.unit}`;
  return `${value} is outside what ${metric} can be (${spec.min} to ${spec.max}${unit}); check the unit`;
}
