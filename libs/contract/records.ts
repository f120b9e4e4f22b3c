// Derived records of contract v1 (docs/contract-v1.md, section 4). The same records go to every output.
// Contract fields are listed exactly; extension fields of our own (flags, sigmas, provenance) are allowed.
import { z } from 'zod';

const iso = z.string().max(40);

/**
 * Faults an `alert` record may name: the contract's five, `silent` (the live daemon's wall-clock dead-man,
 * rule `site_silent`), and the project's own additions.
 */
export const ALERT_FAULTS = ['stale', 'flatline', 'range', 'spike', 'battery', 'silent'] as const;
export type AlertFault = (typeof ALERT_FAULTS)[number];
const n = z.number();
const nn = z.number().nullable(); // a value that may be missing (not evaluated, failed QC)

/**
 * Every record may say it was built from calibrated values (`calibrated`, docs/contract-v1.md) and which
 * revision it is (`revision`: 0 or absent for the first; a later revision replaces the record with the same
 * identity, see record-types.ts `recordKey`, in every output).
 */
const base = {
  site: z.string(),
  t: iso,
  calibrated: z.boolean().optional(),
  revision: z.int().min(0).optional(),
};
const atStation = { ...base, station: z.string() };

export const wavesRecordSchema = z.looseObject({
  type: z.literal('waves'),
  ...atStation,
  hm0_m: nn,
  tp_s: nn,
  tm01_s: nn,
  tm02_s: nn,
  hrms_m: nn,
  hm0_ss_m: nn,
  hm0_ig_m: nn,
  depth_m: nn,
  sensor: z.string(),
});

export const currentRecordSchema = z.looseObject({
  type: z.literal('current'),
  ...atStation,
  east_m_s: nn,
  north_m_s: nn,
  u_m_s: nn,
  v_m_s: nn,
  speed_m_s: nn,
  dir_to_deg: nn,
  bins_used: n,
  sensor: z.string(),
});

export const carbonateRecordSchema = z.looseObject({
  type: z.literal('carbonate'),
  ...atStation,
  ta_umol_kg: nn,
  dic_umol_kg: nn,
  ph_total: nn,
  pco2_uatm: nn,
  co3_umol_kg: nn,
  omega_ar: nn,
  omega_ca: nn,
  ta_source: z.enum(['salinity', 'sample', 'measured']),
});

export const oxygenRecordSchema = z.looseObject({
  type: z.literal('oxygen'),
  ...atStation,
  o2_umol_kg: nn,
  o2_sat_pct: nn,
  o2_mg_l: nn,
});

export const fluxRecordSchema = z.looseObject({
  type: z.literal('flux'),
  ...base,
  transect: z.string(),
  ncp_mmol_m2_h: nn,
  nec_mmol_m2_h: nn,
  nec_method: z.enum(['ta', 'inverse']).nullable(),
  u_m_s: nn,
  depth_m: nn,
  residence_min: nn,
  valid: z.boolean(),
  /** |NCP| and |NEC| above twice their sigma (false when a value or its sigma is missing). */
  ncp_significant: z.boolean(),
  nec_significant: z.boolean(),
  /** Comma-separated causes when `valid` is false, e.g. `input_fault:back/co2/flatline`. */
  invalid_reasons: z.string().optional(),
  /** reefd extension: the window's mean PAR (at the bed where the transect has `kd_par_per_m`). */
  par_umol_m2_s: nn.optional(),
});

export const lightRecordSchema = z.looseObject({
  type: z.literal('light'),
  ...atStation,
  par_umol_m2_s: nn,
  sensor: z.string(),
});

export const dailyRecordSchema = z.looseObject({
  type: z.literal('daily'),
  ...base,
  transect: z.string(),
  /** Local date of the site's time zone, YYYY-MM-DD. */
  day: z.string().regex(/^\d{4}-\d{2}-\d{2}$/),
  ncp_mmol_m2_d: nn,
  ncp_mmol_m2_d_sigma: nn,
  r_mmol_m2_d: nn,
  r_mmol_m2_d_sigma: nn,
  gpp_mmol_m2_d: nn,
  gpp_mmol_m2_d_sigma: nn,
  nec_mmol_m2_d: nn,
  nec_mmol_m2_d_sigma: nn,
  nec_day_mmol_m2_d: nn,
  nec_day_mmol_m2_d_sigma: nn,
  nec_night_mmol_m2_d: nn,
  nec_night_mmol_m2_d_sigma: nn,
  coverage: n,
  gap_filled: n,
  pmax_mmol_m2_h: nn,
  ik_umol_m2_s: nn,
  valid: z.boolean(),
});

export const forecastRecordSchema = z.looseObject({
  type: z.literal('forecast'),
  ...atStation,
  o2_min_mg_l: nn,
  o2_min_lo_mg_l: nn,
  o2_min_hi_mg_l: nn,
  /** ISO time of the expected minimum. */
  t_min: iso.nullable(),
  horizon_h: n,
});

export const alertRecordSchema = z.looseObject({
  type: z.literal('alert'),
  ...base,
  station: z.string().optional(),
  rule: z.string(),
  class: z.enum(['threshold', 'fault']),
  state: z.enum(['raised', 'cleared']),
  value: nn,
  limit: nn,
  metric: z.string().optional(),
  fault: z.enum(ALERT_FAULTS).optional(),
  sensor: z.string().optional(),
});

export const derivedRecordSchema = z.discriminatedUnion('type', [
  wavesRecordSchema,
  currentRecordSchema,
  carbonateRecordSchema,
  oxygenRecordSchema,
  fluxRecordSchema,
  alertRecordSchema,
  lightRecordSchema,
  dailyRecordSchema,
  forecastRecordSchema,
]);

export type WavesRecord = z.infer<typeof wavesRecordSchema>;
export type CurrentRecord = z.infer<typeof currentRecordSchema>;
export type CarbonateRecord = z.infer<typeof carbonateRecordSchema>;
export type OxygenRecord = z.infer<typeof oxygenRecordSchema>;
export type FluxRecord = z.infer<typeof fluxRecordSchema>;
export type AlertRecord = z.infer<typeof alertRecordSchema>;
export type LightRecord = z.infer<typeof lightRecordSchema>;
export type DailyRecord = z.infer<typeof dailyRecordSchema>;
export type ForecastRecord = z.infer<typeof forecastRecordSchema>;
export type DerivedRecord = z.infer<typeof derivedRecordSchema>;
export type RecordType = DerivedRecord['type'];
