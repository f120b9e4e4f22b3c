// Derived records of contract v1 (docs/contract-v1.md, section 4). The same records go to every output.
// Contract fields are listed exactly; extension fields of our own (flags, sigmas, provenance) are allowed.
import { z } from 'zod';

const iso = z.string().max(40);
const n = z.number();
const nn = z.number().nullable(); // a value that may be missing (not evaluated, failed QC)

const base = { site: z.string(), t: iso };
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
  fault: z.enum(['stale', 'flatline', 'range', 'spike', 'battery']).optional(),
  sensor: z.string().optional(),
});

export const derivedRecordSchema = z.discriminatedUnion('type', [
  wavesRecordSchema,
  currentRecordSchema,
  carbonateRecordSchema,
  oxygenRecordSchema,
  fluxRecordSchema,
  alertRecordSchema,
]);

export type WavesRecord = z.infer<typeof wavesRecordSchema>;
export type CurrentRecord = z.infer<typeof currentRecordSchema>;
export type CarbonateRecord = z.infer<typeof carbonateRecordSchema>;
export type OxygenRecord = z.infer<typeof oxygenRecordSchema>;
export type FluxRecord = z.infer<typeof fluxRecordSchema>;
export type AlertRecord = z.infer<typeof alertRecordSchema>;
export type DerivedRecord = z.infer<typeof derivedRecordSchema>;
export type RecordType = DerivedRecord['type'];

export const RECORD_TYPES = ['waves', 'current', 'carbonate', 'oxygen', 'flux', 'alert'] as const;

/**
 * The fields that go to a time-series database: finite numbers and booleans (as 0/1 would lose meaning,
 * booleans stay booleans). Tags are `site` and `station` or `transect` (contract section 4); string fields
 * such as `sensor`, `ta_source`, `nec_method` are kept as string fields.
 */
export function recordTags(r: DerivedRecord): Record<string, string> {
  const tags: Record<string, string> = { site: r.site };
  if (r.type === 'flux') tags.transect = r.transect;
  else if (r.station !== undefined) tags.station = r.station;
  return tags;
}
