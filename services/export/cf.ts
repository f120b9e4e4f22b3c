// NetCDF export following the CF conventions 1.8 (discrete sampling geometry: one time series per file,
// featureType timeSeries, CF 1.8 section 9 and appendix H.2.3 "single time series") and the ACDD 1.3
// attributes: one file per station or transect, every record type of it on one time axis, each variable
// with its units and, where the record-type table names one, its CF standard name; the record's QARTOD flag
// as an ancillary variable (aggregate_quality_flag with flag_values and flag_meanings).
import {
  RECORD_TYPE_SPECS,
  type DerivedRecord,
  type FieldSpec,
  type RecordType,
  type ReefdConfig,
} from '../../libs/contract/index.js';
import {
  charData,
  maxByteLength,
  type NcAttribute,
  type NcDataset,
  type NcVariable,
} from '../../libs/netcdf/index.js';

/** NetCDF's default fill values (netcdf.h NC_FILL_DOUBLE, NC_FILL_BYTE). */
export const FILL_DOUBLE = 9.969209968386869e36;
export const FILL_BYTE = -127;
const FLAG_VALUES = [1, 2, 3, 4, 9];
const FLAG_MEANINGS = 'pass not_evaluated suspect fail missing';

const text = (name: string, value: string): NcAttribute => ({ name, type: 'char', value });
const dbl = (name: string, ...value: number[]): NcAttribute => ({ name, type: 'double', value });
const byte = (name: string, ...value: number[]): NcAttribute => ({ name, type: 'byte', value });

/** Record types exported to NetCDF (alerts are events, not a time series: they go to CSV only). */
export const NETCDF_TYPES = (Object.keys(RECORD_TYPE_SPECS) as RecordType[]).filter((t) => t !== 'alert');

export interface GroupKey {
  subject: 'station' | 'transect';
  id: string;
}

export function groupOf(r: DerivedRecord): GroupKey | undefined {
  if (r.type === 'alert') return undefined;
  const spec = RECORD_TYPE_SPECS[r.type];
  const id = (r as Record<string, unknown>)[spec.subject];
  return typeof id === 'string' && id !== '' ? { subject: spec.subject, id } : undefined;
}

interface VarPlan {
  type: RecordType;
  sensor: string;
  field: string;
  spec: FieldSpec;
  maxLen: number;
}

/** What one file will hold, learnt in a pass over the records. */
export class GroupPlan {
  readonly times = new Set<number>();
  readonly vars = new Map<string, VarPlan>();
  /** (type, sensor) pairs that carry a QC flag. */
  readonly flagged = new Set<string>();
  constructor(readonly key: GroupKey) {}

  add(r: DerivedRecord): void {
    this.times.add(Date.parse(r.t));
    const sensor = sensorOf(r);
    const fields = RECORD_TYPE_SPECS[r.type].fields as Record<string, FieldSpec>;
    const rec = r as Record<string, unknown>;
    for (const [field, spec] of Object.entries(fields)) {
      if (field === 'sensor' || !(field in rec)) continue;
      if (field === 'flag') {
        if (typeof rec.flag === 'number') this.flagged.add(`${r.type}|${sensor}`);
        continue;
      }
      const k = `${r.type}|${sensor}|${field}`;
      let p = this.vars.get(k);
      if (p === undefined) {
        p = { type: r.type, sensor, field, spec, maxLen: 1 };
        this.vars.set(k, p);
      }
      const v = rec[field];
      if (spec.kind === 'string' && typeof v === 'string') p.maxLen = Math.max(p.maxLen, maxByteLength([v]));
    }
  }
}

const sensorOf = (r: DerivedRecord): string => {
  const s = (r as Record<string, unknown>).sensor;
  return typeof s === 'string' ? s : '';
};
const safe = (s: string): string => s.replace(/[^A-Za-z0-9_]/g, '_');

/**
 * Variable names: the field name where it is unique in the file; the record type in front when two types
 * share a field (waves and current both give depth_m); the sensor behind when two sensors of one type do.
 */
export function variableNames(plan: GroupPlan): { data: Map<string, string>; flags: Map<string, string> } {
  const byField = new Map<string, VarPlan[]>();
  for (const p of plan.vars.values()) byField.set(p.field, [...(byField.get(p.field) ?? []), p]);
  const sensorsOfType = new Map<RecordType, Set<string>>();
  for (const k of [...plan.flagged, ...[...plan.vars.values()].map((p) => `${p.type}|${p.sensor}`)]) {
    const [type, sensor = ''] = k.split('|') as [RecordType, string];
    sensorsOfType.set(type, (sensorsOfType.get(type) ?? new Set()).add(sensor));
  }
  const multi = (t: RecordType) => (sensorsOfType.get(t)?.size ?? 0) > 1;
  const data = new Map<string, string>();
  for (const [field, list] of byField) {
    const types = new Set(list.map((p) => p.type));
    for (const p of list) {
      let name = types.size > 1 ? `${p.type}_${field}` : field;
      if (multi(p.type) && p.sensor !== '') name += `_${safe(p.sensor)}`;
      data.set(`${p.type}|${p.sensor}|${field}`, name);
    }
  }
  const flags = new Map<string, string>();
  for (const k of plan.flagged) {
    const [type, sensor = ''] = k.split('|') as [RecordType, string];
    flags.set(k, `${type}_qc${multi(type) && sensor !== '' ? `_${safe(sensor)}` : ''}`);
  }
  return { data, flags };
}

/** Values of one file, filled in a second pass over the records. */
export class GroupValues {
  readonly index: Map<number, number>;
  readonly time: Float64Array;
  readonly numbers = new Map<string, Float64Array>();
  readonly bytes = new Map<string, Int8Array>();
  readonly strings = new Map<string, string[]>();
  readonly names: ReturnType<typeof variableNames>;

  constructor(readonly plan: GroupPlan) {
    this.time = Float64Array.from([...plan.times].sort((a, b) => a - b));
    this.index = new Map(Array.from(this.time, (t, i) => [t, i]));
    this.names = variableNames(plan);
    const n = this.time.length;
    for (const [k, p] of plan.vars) {
      if (p.spec.kind === 'number') this.numbers.set(k, new Float64Array(n).fill(FILL_DOUBLE));
      else if (p.spec.kind === 'boolean') this.bytes.set(k, new Int8Array(n).fill(FILL_BYTE));
      else this.strings.set(k, new Array<string>(n).fill(''));
    }
    for (const k of plan.flagged) this.bytes.set(`${k}|flag`, new Int8Array(n).fill(FILL_BYTE));
  }

  add(r: DerivedRecord): void {
    const i = this.index.get(Date.parse(r.t));
    if (i === undefined) return;
    const sensor = sensorOf(r);
    const rec = r as Record<string, unknown>;
    for (const field of Object.keys(RECORD_TYPE_SPECS[r.type].fields)) {
      const v = rec[field];
      const k = field === 'flag' ? `${r.type}|${sensor}|flag` : `${r.type}|${sensor}|${field}`;
      if (typeof v === 'number' && Number.isFinite(v)) {
        const num = this.numbers.get(k);
        if (num) num[i] = v;
        const b = this.bytes.get(k);
        if (b && field === 'flag') b[i] = v;
      } else if (typeof v === 'boolean') {
        const b = this.bytes.get(k);
        if (b) b[i] = v ? 1 : 0;
      } else if (typeof v === 'string') {
        const s = this.strings.get(k);
        if (s) s[i] = v;
      }
    }
  }
}

export interface CfContext {
  config?: ReefdConfig | undefined;
  site: string;
  /** ISO time the files are made (ACDD date_created). */
  createdIso: string;
  /** Producer, e.g. `reefd 0.1.0`. */
  software: string;
  /** Extra global attributes (ACDD: creator_name, institution, license, ...), overriding the defaults. */
  meta: Readonly<Record<string, string | number>>;
  /** What the records came from, for `history`. */
  sourceName: string;
}

export function position(
  ctx: Pick<CfContext, 'config'>,
  key: GroupKey,
): { lat: number; lon: number } | undefined {
  const cfg = ctx.config;
  if (cfg === undefined) return undefined;
  if (key.subject === 'station') return cfg.stations[key.id]?.position;
  const tr = cfg.transects[key.id];
  const a = tr ? cfg.stations[tr.upstream]?.position : undefined;
  const b = tr ? cfg.stations[tr.downstream]?.position : undefined;
  return a && b ? { lat: (a.lat + b.lat) / 2, lon: (a.lon + b.lon) / 2 } : undefined;
}

const isoDuration = (ms: number): string => {
  const s = Math.round(ms / 1000);
  const d = Math.floor(s / 86400);
  const h = Math.floor((s % 86400) / 3600);
  const m = Math.floor((s % 3600) / 60);
  return `P${d}DT${h}H${m}M${s % 60}S`;
};

function globals(
  ctx: CfContext,
  v: GroupValues,
  pos: { lat: number; lon: number } | undefined,
): NcAttribute[] {
  const key = v.plan.key;
  const cfg = ctx.config;
  const label = key.subject === 'station' ? cfg?.stations[key.id]?.label : cfg?.transects[key.id]?.label;
  const types = [...new Set([...v.plan.vars.values()].map((p) => p.type))].sort();
  const t0 = v.time[0] ?? 0;
  const t1 = v.time[v.time.length - 1] ?? 0;
  const iso = (ms: number) => new Date(ms).toISOString().replace('.000Z', 'Z');
  const attrs: Record<string, string | number> = {
    Conventions: 'CF-1.8, ACDD-1.3',
    featureType: 'timeSeries',
    cdm_data_type: 'Station',
    title: `${ctx.site} ${key.subject} ${key.id}${label ? ` (${label})` : ''}: ${types.join(', ')}`,
    summary:
      `Derived records of the ${key.subject} ${key.id} at the reef site ${ctx.site}, made by reefd from the ` +
      `sensor telemetry: ${types.map((t) => RECORD_TYPE_SPECS[t].label).join('; ')}. Each record type's ` +
      `QARTOD flag (1 pass, 2 not evaluated, 3 suspect, 4 fail, 9 missing) is an ancillary variable.`,
    keywords:
      'coral reef, seawater carbonate system, dissolved oxygen, ocean waves, ocean currents, community metabolism',
    id: `${ctx.site}.${key.subject}.${key.id}`,
    naming_authority: 'reefd',
    source: `${ctx.software} from in-situ sensor telemetry (${ctx.sourceName})`,
    history: `${ctx.createdIso} ${ctx.software} export of ${ctx.sourceName}`,
    comment:
      'Times are UTC; missing values carry _FillValue; each value is the latest revision of its record. ' +
      'Alerts, calibration marks (calibrated) and revision counters are in the CSV export.',
    processing_level:
      'derived from sensor data with automated QARTOD quality control; see the flag variables',
    date_created: ctx.createdIso,
    standard_name_vocabulary: 'CF Standard Name Table v93',
    platform: key.subject === 'station' ? key.id : `${key.id} (transect)`,
    time_coverage_start: iso(t0),
    time_coverage_end: iso(t1),
    time_coverage_duration: isoDuration(t1 - t0),
  };
  if (pos !== undefined) {
    Object.assign(attrs, {
      geospatial_lat_min: pos.lat,
      geospatial_lat_max: pos.lat,
      geospatial_lat_units: 'degrees_north',
      geospatial_lon_min: pos.lon,
      geospatial_lon_max: pos.lon,
      geospatial_lon_units: 'degrees_east',
      geospatial_bounds: `POINT (${pos.lat} ${pos.lon})`,
      geospatial_bounds_crs: 'EPSG:4326',
    });
  }
  Object.assign(attrs, ctx.meta);
  return Object.entries(attrs).map(([k, val]) => (typeof val === 'number' ? dbl(k, val) : text(k, val)));
}

/** The CF/ACDD dataset of one station or transect. */
export function buildDataset(ctx: CfContext, v: GroupValues): NcDataset {
  const key = v.plan.key;
  const n = v.time.length;
  const pos = position(ctx, key);
  const dims = [
    { name: 'time', length: n },
    { name: 'name_strlen', length: maxByteLength([key.id]) },
  ];
  const coords = ['time', ...(pos ? ['lat', 'lon'] : []), 'station_name'].join(' ');
  const vars: NcVariable[] = [
    {
      name: 'time',
      dims: ['time'],
      type: 'double',
      attributes: [
        text('standard_name', 'time'),
        text('long_name', 'time the value represents'),
        text('units', 'seconds since 1970-01-01T00:00:00Z'),
        text('calendar', 'standard'),
        text('axis', 'T'),
        text('coverage_content_type', 'coordinate'),
      ],
      data: Float64Array.from(v.time, (ms) => ms / 1000),
    },
    {
      name: 'station_name',
      dims: ['name_strlen'],
      type: 'char',
      attributes: [text('cf_role', 'timeseries_id'), text('long_name', `${key.subject} id`)],
      data: charData([key.id], maxByteLength([key.id])),
    },
  ];
  if (pos) {
    vars.push(
      {
        name: 'lat',
        dims: [],
        type: 'double',
        attributes: [
          text('standard_name', 'latitude'),
          text(
            'long_name',
            key.subject === 'station' ? 'station latitude' : 'latitude of the transect midpoint',
          ),
          text('units', 'degrees_north'),
          text('axis', 'Y'),
          text('coverage_content_type', 'coordinate'),
        ],
        data: [pos.lat],
      },
      {
        name: 'lon',
        dims: [],
        type: 'double',
        attributes: [
          text('standard_name', 'longitude'),
          text(
            'long_name',
            key.subject === 'station' ? 'station longitude' : 'longitude of the transect midpoint',
          ),
          text('units', 'degrees_east'),
          text('axis', 'X'),
          text('coverage_content_type', 'coordinate'),
        ],
        data: [pos.lon],
      },
    );
  }
  const strlenDims = new Map<number, string>();
  const sorted = [...v.plan.vars.entries()].sort(([a], [b]) => (a < b ? -1 : 1));
  for (const [k, p] of sorted) {
    const name = v.names.data.get(k) as string;
    const flagName = v.names.flags.get(`${p.type}|${p.sensor}`);
    const attrs: NcAttribute[] = [
      text('long_name', p.sensor ? `${p.spec.label} (${p.sensor})` : p.spec.label),
      text(
        'coverage_content_type',
        p.spec.kind === 'number' ? 'physicalMeasurement' : 'auxiliaryInformation',
      ),
    ];
    if (p.spec.standardName) attrs.push(text('standard_name', p.spec.standardName));
    attrs.push(text('coordinates', coords));
    if (p.spec.kind === 'number') {
      attrs.unshift(dbl('_FillValue', FILL_DOUBLE));
      if (p.spec.unit !== '') attrs.push(text('units', p.spec.unit));
      if (flagName) attrs.push(text('ancillary_variables', flagName));
      vars.push({
        name,
        dims: ['time'],
        type: 'double',
        attributes: attrs,
        data: v.numbers.get(k) as Float64Array,
      });
    } else if (p.spec.kind === 'boolean') {
      attrs.unshift(byte('_FillValue', FILL_BYTE));
      attrs.push(byte('flag_values', 0, 1), text('flag_meanings', 'false true'));
      vars.push({ name, dims: ['time'], type: 'byte', attributes: attrs, data: v.bytes.get(k) as Int8Array });
    } else {
      let dim = strlenDims.get(p.maxLen);
      if (dim === undefined) {
        dim = `strlen${p.maxLen}`;
        strlenDims.set(p.maxLen, dim);
        dims.push({ name: dim, length: p.maxLen });
      }
      vars.push({
        name,
        dims: ['time', dim],
        type: 'char',
        attributes: attrs,
        data: charData(v.strings.get(k) as string[], p.maxLen),
      });
    }
  }
  for (const k of [...v.plan.flagged].sort()) {
    const [type, sensor = ''] = k.split('|') as [RecordType, string];
    vars.push({
      name: v.names.flags.get(k) as string,
      dims: ['time'],
      type: 'byte',
      attributes: [
        byte('_FillValue', FILL_BYTE),
        text(
          'long_name',
          `QARTOD flag of the ${RECORD_TYPE_SPECS[type].label} record${sensor ? ` (${sensor})` : ''}`,
        ),
        text('standard_name', 'aggregate_quality_flag'),
        text('coverage_content_type', 'qualityInformation'),
        byte('flag_values', ...FLAG_VALUES),
        text('flag_meanings', FLAG_MEANINGS),
        text('coordinates', coords),
      ],
      data: v.bytes.get(`${k}|flag`) as Int8Array,
    });
  }
  return { dimensions: dims, attributes: globals(ctx, v, pos), variables: vars };
}
