// One table of the derived record types (docs/contract-v1.md, records): what each record is about, its
// identity, its database tags and its fields with units and names. Every output reads this table (line
// protocol, exactly-once keys, export, dashboard, OpenAPI), so a new record type is one entry here plus its
// zod schema in records.ts; `satisfies Record<RecordType, ...>` makes the compiler name a missing entry.
import type { DerivedRecord, RecordType } from './records.js';

/** What a record describes: a station (and one of its sensors), a transect, or the whole site. */
export type RecordSubject = 'station' | 'transect';

export interface FieldSpec {
  /** UDUNITS-compatible unit string ('1' for a dimensionless number; '' for a string or boolean field). */
  unit: string;
  /** A few words for a person: axis labels, tooltips, export long_name. */
  label: string;
  /** CF standard name, only where one exists and matches the quantity exactly. */
  standardName?: string;
  kind: 'number' | 'string' | 'boolean';
}

export interface RecordTypeSpec {
  subject: RecordSubject;
  /** A few words for a person. */
  label: string;
  /**
   * Database tags besides `site`, in this order, each taken from the record's field of the same name when
   * present (contract: station records by station and sensor, transect records by transect, alerts also by
   * rule). Two sensors of one kind at one station never share a series.
   */
  tags: readonly string[];
  /**
   * Fields that, with type, site and t, identify a record: a later revision of a record (same identity)
   * replaces it, and an output that has a record with this identity already has it.
   */
  identity: readonly string[];
  /** Contract fields and the main extension fields (flags and sigmas are listed where they exist). */
  fields: Readonly<Record<string, FieldSpec>>;
}

const num = (unit: string, label: string, standardName?: string): FieldSpec =>
  standardName === undefined
    ? { unit, label, kind: 'number' }
    : { unit, label, kind: 'number', standardName };
const str = (label: string): FieldSpec => ({ unit: '', label, kind: 'string' });
const bool = (label: string): FieldSpec => ({ unit: '', label, kind: 'boolean' });
const flag: FieldSpec = {
  unit: '1',
  label: 'QARTOD flag (1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing)',
  kind: 'number',
};

const stationTags = ['station', 'sensor'] as const;
const stationIdentity = ['station', 'sensor'] as const;

/** Daily budget fields with their sigma, mmol m-2 d-1. */
function dailyFields(): Record<string, FieldSpec> {
  const out: Record<string, FieldSpec> = {};
  const items: [string, string][] = [
    ['ncp_mmol_m2_d', 'daily net community production'],
    ['r_mmol_m2_d', 'daily community respiration'],
    ['gpp_mmol_m2_d', 'daily gross primary production'],
    ['nec_mmol_m2_d', 'daily net ecosystem calcification'],
    ['nec_day_mmol_m2_d', 'daytime net ecosystem calcification'],
    ['nec_night_mmol_m2_d', 'night-time net ecosystem calcification'],
  ];
  for (const [name, label] of items) {
    out[name] = num('mmol m-2 d-1', label);
    out[`${name}_sigma`] = num('mmol m-2 d-1', `standard uncertainty of ${label}`);
  }
  return out;
}

export const RECORD_TYPE_SPECS = {
  waves: {
    subject: 'station',
    label: 'waves from a pressure burst',
    tags: stationTags,
    identity: stationIdentity,
    fields: {
      hm0_m: num('m', 'significant wave height Hm0', 'sea_surface_wave_significant_height'),
      tp_s: num('s', 'peak period', 'sea_surface_wave_period_at_variance_spectral_density_maximum'),
      tm01_s: num(
        's',
        'mean period Tm01',
        'sea_surface_wave_mean_period_from_variance_spectral_density_first_frequency_moment',
      ),
      tm02_s: num(
        's',
        'mean period Tm02',
        'sea_surface_wave_mean_period_from_variance_spectral_density_second_frequency_moment',
      ),
      hrms_m: num('m', 'root-mean-square wave height'),
      hm0_ss_m: num('m', 'sea-swell band Hm0 (0.04 Hz to cutoff)'),
      hm0_ig_m: num('m', 'infragravity band Hm0 (0.005 to 0.04 Hz)'),
      depth_m: num('m', 'mean water depth over the burst', 'sea_floor_depth_below_sea_surface'),
      hm0_sigma_m: num(
        'm',
        'standard uncertainty of Hm0',
        'sea_surface_wave_significant_height standard_error',
      ),
      sensor: str('sensor'),
      flag,
    },
  },
  current: {
    subject: 'station',
    label: 'depth-averaged current from an ADCP ensemble',
    tags: stationTags,
    identity: stationIdentity,
    fields: {
      east_m_s: num('m s-1', 'eastward depth-averaged velocity', 'eastward_sea_water_velocity'),
      north_m_s: num('m s-1', 'northward depth-averaged velocity', 'northward_sea_water_velocity'),
      u_m_s: num('m s-1', 'cross-reef velocity (shoreward positive)'),
      v_m_s: num('m s-1', 'along-reef velocity'),
      speed_m_s: num('m s-1', 'current speed', 'sea_water_speed'),
      dir_to_deg: num('degree', 'current direction (towards, true)', 'sea_water_velocity_to_direction'),
      bins_used: num('1', 'valid bins in the depth average'),
      speed_sigma_m_s: num('m s-1', 'standard uncertainty of the speed', 'sea_water_speed standard_error'),
      sensor: str('sensor'),
      flag,
    },
  },
  carbonate: {
    subject: 'station',
    label: 'seawater carbonate system',
    tags: stationTags,
    identity: stationIdentity,
    fields: {
      ta_umol_kg: num(
        'umol kg-1',
        'total alkalinity',
        'sea_water_alkalinity_per_unit_mass_expressed_as_mole_equivalent',
      ),
      dic_umol_kg: num(
        'umol kg-1',
        'dissolved inorganic carbon',
        'moles_of_dissolved_inorganic_carbon_per_unit_mass_in_sea_water',
      ),
      ph_total: num('1', 'pH on the total scale', 'sea_water_ph_reported_on_total_scale'),
      pco2_uatm: num('uatm', 'partial pressure of CO2', 'partial_pressure_of_carbon_dioxide_in_sea_water'),
      co3_umol_kg: num('umol kg-1', 'carbonate ion'),
      omega_ar: num('1', 'aragonite saturation state'),
      omega_ca: num('1', 'calcite saturation state'),
      ta_source: str('where TA came from (salinity, sample or measured)'),
      sensor: str('sensor'),
      flag,
    },
  },
  oxygen: {
    subject: 'station',
    label: 'dissolved oxygen',
    tags: stationTags,
    identity: stationIdentity,
    fields: {
      o2_umol_kg: num('umol kg-1', 'dissolved oxygen', 'moles_of_oxygen_per_unit_mass_in_sea_water'),
      o2_sat_pct: num('percent', 'oxygen saturation', 'fractional_saturation_of_oxygen_in_sea_water'),
      o2_mg_l: num('mg L-1', 'dissolved oxygen', 'mass_concentration_of_oxygen_in_sea_water'),
      sensor: str('sensor'),
      flag,
    },
  },
  light: {
    subject: 'station',
    label: 'photosynthetically active radiation',
    tags: stationTags,
    identity: stationIdentity,
    fields: {
      par_umol_m2_s: num(
        'umol m-2 s-1',
        'photosynthetically active radiation',
        'downwelling_photosynthetic_photon_flux_in_sea_water',
      ),
      sensor: str('sensor'),
      flag,
    },
  },
  flux: {
    subject: 'transect',
    label: 'community metabolism over a transect (30-min window)',
    tags: ['transect'],
    identity: ['transect'],
    fields: {
      ncp_mmol_m2_h: num('mmol m-2 h-1', 'net community production (O2)'),
      nec_mmol_m2_h: num('mmol m-2 h-1', 'net ecosystem calcification (CaCO3)'),
      nec_method: str('NEC method (ta or inverse)'),
      u_m_s: num('m s-1', 'velocity along the transect'),
      depth_m: num('m', 'mean water depth of the transect'),
      residence_min: num('min', 'residence time over the transect'),
      valid: bool('window valid for metabolism'),
      ncp_significant: bool('|NCP| above twice its sigma'),
      nec_significant: bool('|NEC| above twice its sigma'),
      ncp_sigma_mmol_m2_h: num('mmol m-2 h-1', 'standard uncertainty of NCP'),
      nec_sigma_mmol_m2_h: num('mmol m-2 h-1', 'standard uncertainty of NEC'),
      nec_inverse_mmol_m2_h: num('mmol m-2 h-1', 'NEC by the pCO2 + O2 inverse in a TA-budget window'),
      invalid_reasons: str('why the window is not valid'),
      par_umol_m2_s: num('umol m-2 s-1', 'photosynthetically active radiation of the window'),
      flag,
    },
  },
  daily: {
    subject: 'transect',
    label: 'daily metabolism of a transect (local day)',
    tags: ['transect'],
    identity: ['transect'],
    fields: {
      day: str('local date'),
      ...dailyFields(),
      coverage: num('1', 'fraction of the day measured and valid'),
      gap_filled: num('1', 'fraction of the day filled from the light responses'),
      pmax_mmol_m2_h: num('mmol m-2 h-1', 'maximum gross production of the light response'),
      ik_umol_m2_s: num('umol m-2 s-1', 'light saturation parameter Ik'),
      valid: bool('day valid'),
    },
  },
  forecast: {
    subject: 'station',
    label: 'expected minimum oxygen before sunrise',
    tags: ['station'],
    identity: ['station'],
    fields: {
      o2_min_mg_l: num('mg L-1', 'expected minimum dissolved oxygen'),
      o2_min_lo_mg_l: num('mg L-1', 'lower end of the 80 % interval'),
      o2_min_hi_mg_l: num('mg L-1', 'upper end of the 80 % interval'),
      t_min: str('time of the expected minimum'),
      horizon_h: num('h', 'hours from issue to the expected minimum'),
    },
  },
  alert: {
    subject: 'station',
    label: 'alert raised or cleared',
    tags: ['station', 'sensor', 'rule'],
    identity: ['station', 'sensor', 'rule', 'state'],
    fields: {
      rule: str('rule'),
      class: str('threshold or fault'),
      state: str('raised or cleared'),
      value: num('', 'value that raised or cleared the alert (unit of its metric)'),
      limit: num('', 'limit of the rule (unit of its metric)'),
      metric: str('metric (record type and field)'),
      fault: str('fault'),
      sensor: str('sensor'),
    },
  },
} as const satisfies Record<RecordType, RecordTypeSpec>;

/** Every record type, in the table's order. */
export const RECORD_TYPES = Object.keys(RECORD_TYPE_SPECS) as RecordType[];

const field = (r: DerivedRecord, name: string): string | undefined => {
  const v = (r as Record<string, unknown>)[name];
  return typeof v === 'string' && v !== '' ? v : undefined;
};

/** Database tags of a record: `site` plus the type's tags that the record carries. */
export function recordTags(r: DerivedRecord): Record<string, string> {
  const tags: Record<string, string> = { site: r.site };
  for (const name of RECORD_TYPE_SPECS[r.type].tags) {
    const v = field(r, name);
    if (v !== undefined) tags[name] = v;
  }
  return tags;
}

/**
 * The identity of a record: type, site, t and the type's identity fields (`revision` is not part of it, so a
 * revised record has its original's key). Separator: a character ids may not contain.
 */
export function recordKey(r: DerivedRecord): string {
  let key = `${r.type}|${r.site}|${r.t}`;
  for (const name of RECORD_TYPE_SPECS[r.type].identity) key += `|${field(r, name) ?? ''}`;
  return key;
}

/** The spec of one field of a record type, if the table lists it. */
export function fieldSpec(type: RecordType, name: string): FieldSpec | undefined {
  return (RECORD_TYPE_SPECS[type].fields as Record<string, FieldSpec>)[name];
}
