// Derived records (docs/contract-v1.md, records) as line-protocol points: measurement = record type, tags from
// the record-type table (site; station and sensor, or transect; alerts also rule), fields = the other numeric,
// boolean and string fields, time = `t` in ms.
import { recordTags, type DerivedRecord } from '../contract/index.js';
import { escapeKey, escapeMeasurement, quoteFieldString, type Dialect } from './escape.js';

/** Keys that are the series identity or the time, never fields. */
const NOT_FIELDS = new Set(['type', 'site', 'station', 'transect', 't']);

export type FieldValue = number | boolean | string;

export interface Point {
  measurement: string;
  tags: Record<string, string>;
  fields: Record<string, FieldValue>;
  timeMs: number;
}

export type PointResult = { ok: true; point: Point } | { ok: false; reason: string };

/**
 * Maps one record to a point. Nulls and non-finite numbers are omitted (the database has no null),
 * nested objects and arrays are skipped. A record with no field left, or with an unreadable `t`, is refused.
 */
/**
 * `stringFields: false` leaves string fields out: VictoriaMetrics stores every field as a number and turns a
 * string that looks like one (an alert id such as `5e12ab03`) into that number, or 0.
 */
export function recordToPoint(record: DerivedRecord, opts: { stringFields?: boolean } = {}): PointResult {
  const strings = opts.stringFields ?? true;
  const timeMs = Date.parse(record.t);
  if (!Number.isFinite(timeMs)) return { ok: false, reason: 'bad_time' };
  const tags = recordTags(record);
  const fields: Record<string, FieldValue> = {};
  let n = 0;
  for (const [key, value] of Object.entries(record)) {
    // A tag is never also a field: a key that is both makes every query of it ambiguous.
    if (NOT_FIELDS.has(key) || key in tags) continue;
    if (typeof value === 'number') {
      if (!Number.isFinite(value)) continue;
    } else if (typeof value === 'string') {
      if (!strings) continue;
    } else if (typeof value !== 'boolean') continue;
    fields[key] = value;
    n++;
  }
  if (n === 0) return { ok: false, reason: 'no_fields' };
  return {
    ok: true,
    point: { measurement: record.type, tags, fields, timeMs: Math.round(timeMs) },
  };
}

function formatField(v: FieldValue): string {
  if (typeof v === 'string') return quoteFieldString(v);
  if (typeof v === 'boolean') return v ? 'true' : 'false';
  // Always floats (no `i` suffix): a field written once as integer and once as float is a type conflict
  // in InfluxDB, and `bins_used` is a count that JSON cannot tell apart from a float.
  return String(v);
}

/** One line of line protocol (no newline), timestamp in ms (write with precision=ms). */
export function formatPoint(p: Point, dialect: Dialect): string {
  let line = escapeMeasurement(p.measurement, dialect);
  for (const key of Object.keys(p.tags).sort()) {
    const value = p.tags[key];
    // An empty tag value is not allowed by line protocol; such a tag is left out.
    if (value === undefined || value === '') continue;
    line += ',' + escapeKey(key, dialect) + '=' + escapeKey(value, dialect);
  }
  const fields: string[] = [];
  for (const [key, value] of Object.entries(p.fields))
    fields.push(escapeKey(key, dialect) + '=' + formatField(value));
  return line + ' ' + fields.join(',') + ' ' + String(p.timeMs);
}

/** The line for one record, or the reason it has none. */
export function recordToLine(
  record: DerivedRecord,
  dialect: Dialect,
  opts: { stringFields?: boolean } = {},
): { ok: true; line: string } | { ok: false; reason: string } {
  const r = recordToPoint(record, opts);
  return r.ok ? { ok: true, line: formatPoint(r.point, dialect) } : r;
}
