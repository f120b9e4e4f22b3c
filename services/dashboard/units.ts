// Units and labels of the quantities the dashboard shows, from the record-type table (libs/contract
// record-types.ts) for derived fields. Raw message fields (`ctd.temp_c`, `met.wind_m_s`, `*.battery_v`, the
// metrics user rules may name) are not in that table: their unit follows from the house rule that every name
// ends in its unit, read by `unitFromName` (a test checks the rule against every field the table lists).
import { RECORD_TYPE_SPECS, type RecordType } from '../../libs/contract/index.js';

/** UDUNITS-style unit of a name by its suffix ('' when the name carries none). Longest suffix first. */
const SUFFIX_UNITS: readonly (readonly [string, string])[] = [
  ['_umol_m2_s', 'umol m-2 s-1'],
  ['_mmol_m2_h', 'mmol m-2 h-1'],
  ['_mmol_m2_d', 'mmol m-2 d-1'],
  ['_umol_kg', 'umol kg-1'],
  ['_umol_l', 'umol L-1'],
  ['_mg_l', 'mg L-1'],
  ['_ms_cm', 'mS cm-1'],
  ['_m_s', 'm s-1'],
  ['_uatm', 'uatm'],
  ['_dbar', 'dbar'],
  ['_hpa', 'hPa'],
  ['_ppm', 'ppm'],
  ['_pct', 'percent'],
  ['_deg', 'degree'],
  ['_min', 'min'],
  ['_hz', 'Hz'],
  ['_c', 'degree_Celsius'],
  ['_v', 'V'],
  ['_m', 'm'],
  ['_s', 's'],
  ['_h', 'h'],
];

/** Fields whose name is a quantity of the trade without a unit suffix: practical salinity, pH, saturation states. */
const DIMENSIONLESS = new Set([
  'sal',
  'sal_used',
  'sal_setting',
  'ph_total',
  'omega_ar',
  'omega_ca',
  'revelle',
]);

export function unitFromName(field: string): string {
  if (DIMENSIONLESS.has(field)) return '1';
  const f = field.toLowerCase().replace(/_sigma$/, '');
  for (const [suffix, unit] of SUFFIX_UNITS) if (f.endsWith(suffix)) return unit;
  return '';
}

/** Words for raw message fields a rule may name (the table covers derived records only). */
const RAW_LABELS: Readonly<Record<string, string>> = {
  temp_c: 'water temperature',
  sal: 'practical salinity',
  pres_dbar: 'pressure',
  cond_ms_cm: 'conductivity',
  wind_m_s: 'wind speed',
  wind_dir_deg: 'wind direction',
  baro_hpa: 'air pressure',
  air_temp_c: 'air temperature',
  xco2_air_ppm: 'CO2 in air',
  par_umol_m2_s: 'light (PAR)',
  battery_v: 'supply voltage',
  pco2_uatm: 'partial pressure of CO2',
};

export interface MetricInfo {
  /** UDUNITS-style unit; '1' dimensionless; '' unknown. */
  unit: string;
  label: string;
}

/** Unit and label of a rule metric `<record type or message kind>.<field>`. */
export function metricInfo(metric: string): MetricInfo {
  const dot = metric.indexOf('.');
  const type = metric.slice(0, dot);
  const field = metric.slice(dot + 1);
  const spec = (
    RECORD_TYPE_SPECS as Record<string, { fields: Record<string, { unit: string; label: string }> }>
  )[type]?.fields[field];
  if (spec !== undefined) return { unit: spec.unit, label: spec.label };
  return { unit: unitFromName(field), label: RAW_LABELS[field] ?? field.replace(/_/g, ' ') };
}

/** Every numeric field the table gives a unit to, as [type, field, unit] (for the consistency test). */
export function tableUnits(): [RecordType, string, string][] {
  const out: [RecordType, string, string][] = [];
  for (const [type, spec] of Object.entries(RECORD_TYPE_SPECS))
    for (const [name, f] of Object.entries(spec.fields as Record<string, { unit: string; kind: string }>))
      if (f.kind === 'number') out.push([type as RecordType, name, f.unit]);
  return out;
}
