// Read-back of the daemon's outputs for the end-to-end tests: the NDJSON file, the time-series databases
// (VictoriaMetrics over /api/v1/export, InfluxDB 1.x over /query) and the Kafka derived topic, each
// compared field by field with the records of the NDJSON output.
import { readFileSync } from 'node:fs';
import { Kafka, logLevel } from 'kafkajs';
import { recordTags, type DerivedRecord } from '../../../libs/contract/index.js';
import { influxQuery, type VmSeries } from '../../integration/io/influx-http.js';

export function readNdjsonLines(file: string): string[] {
  return readFileSync(file, 'utf8')
    .split('\n')
    .filter((l) => l !== '');
}

export function readNdjson<T = DerivedRecord>(file: string): T[] {
  return readNdjsonLines(file).map((l) => JSON.parse(l) as T);
}

/**
 * VictoriaMetrics /api/v1/export, tolerant of the non-JSON tokens it prints for infinite and NaN values
 * (+Inf, -Inf, NaN; read as null). VictoriaMetrics turns line-protocol string fields into numbers where
 * the text parses as one: an alert `id` such as "5e812a3c" becomes +Inf in the series `alert_id`.
 */
export async function vmExport(url: string, match: string): Promise<VmSeries[]> {
  await fetch(`${url}/internal/force_flush`);
  const res = await fetch(`${url}/api/v1/export`, {
    method: 'POST',
    body: new URLSearchParams({ 'match[]': match }),
  });
  const text = await res.text();
  return text
    .split('\n')
    .filter((l) => l.trim() !== '')
    .map((l) => JSON.parse(l.replace(/([[,])([+-]Inf|NaN)(?=[,\]])/g, '$1null')) as VmSeries);
}

const NOT_FIELDS = new Set(['type', 'site', 'station', 'transect', 't']);

/** The numeric (and boolean, stored as 1/0 by VictoriaMetrics) fields a record puts in the database. */
export function numericFields(r: DerivedRecord, booleans: 'number' | 'bool'): [string, number | boolean][] {
  const out: [string, number | boolean][] = [];
  for (const [k, v] of Object.entries(r)) {
    if (NOT_FIELDS.has(k)) continue;
    if (typeof v === 'number' && Number.isFinite(v)) out.push([k, v]);
    else if (typeof v === 'boolean') out.push([k, booleans === 'number' ? (v ? 1 : 0) : v]);
  }
  return out;
}

/** One problem per missing or different value, at most `limit`. */
export interface Mismatch {
  record: string;
  field: string;
  want: unknown;
  got: unknown;
}

const close = (a: number, b: number) =>
  a === b || Math.abs(a - b) <= 1e-9 * Math.max(Math.abs(a), Math.abs(b));

/**
 * Every numeric field of every record against VictoriaMetrics: series `<type>_<field>` with labels site and
 * station (or transect), the point at the record's time. Points sharing a series and a time (the database
 * keeps one of them) accept any of the records' values.
 */
export async function compareWithVictoria(
  vmUrl: string,
  site: string,
  records: readonly DerivedRecord[],
): Promise<{ checked: number; mismatches: Mismatch[]; extraLabels: string[] }> {
  const series = await vmExport(vmUrl, `{site="${site}"}`);
  const got = new Map<string, number[]>();
  const extraLabels = new Set<string>();
  for (const s of series) {
    const { __name__: name, site: _s, station, transect, sensor, rule, db: _db, ...rest } = s.metric;
    for (const k of Object.keys(rest)) extraLabels.add(k);
    const who = `${station !== undefined ? `station=${station}` : `transect=${transect ?? ''}`}|${sensor ?? ''}|${rule ?? ''}`;
    s.timestamps.forEach((ts, i) => {
      const key = `${name}|${who}|${ts}`;
      const list = got.get(key) ?? [];
      list.push(s.values[i] ?? NaN);
      got.set(key, list);
    });
  }
  const want = new Map<string, number[]>();
  for (const r of records) {
    const tags = recordTags(r);
    // Series labels per docs/contract-v1.md: site, station (or transect), and sensor and rule where the
    // record has them, so two sensors of one kind at one station are two series.
    const who = `${tags.transect !== undefined ? `transect=${tags.transect}` : `station=${tags.station ?? ''}`}|${tags.sensor ?? ''}|${tags.rule ?? ''}`;
    for (const [f, v] of numericFields(r, 'number')) {
      const key = `${r.type}_${f}|${who}|${Date.parse(r.t)}`;
      want.set(key, [...(want.get(key) ?? []), v as number]);
    }
  }
  const mismatches: Mismatch[] = [];
  for (const [key, values] of want) {
    const g = got.get(key);
    if (g === undefined || !g.some((x) => values.some((v) => close(x, v))))
      mismatches.push({ record: key, field: key.split('|')[0] ?? '', want: values, got: g });
  }
  return { checked: want.size, mismatches, extraLabels: [...extraLabels] };
}

/**
 * Every record against InfluxDB 1.x: measurement = type, tags site and station (or transect), numeric and
 * boolean fields, time = t.
 */
export async function compareWithInflux1(
  url: string,
  db: string,
  records: readonly DerivedRecord[],
): Promise<{ checked: number; mismatches: Mismatch[]; tagKeys: Record<string, string[]> }> {
  const byType = new Map<string, DerivedRecord[]>();
  for (const r of records) byType.set(r.type, [...(byType.get(r.type) ?? []), r]);
  const mismatches: Mismatch[] = [];
  const tagKeys: Record<string, string[]> = {};
  let checked = 0;
  for (const [type, list] of byType) {
    const keys = await influxQuery(url, db, `SHOW TAG KEYS FROM "${type}"`);
    tagKeys[type] = keys.flatMap((s) => s.values.map((v) => String(v[0]))).sort();
    const series = await influxQuery(url, db, `SELECT * FROM "${type}" GROUP BY *`);
    const got = new Map<string, Record<string, unknown>[]>();
    for (const s of series as { columns: string[]; values: unknown[][]; tags?: Record<string, string> }[]) {
      const tags = s.tags ?? {};
      for (const v of s.values) {
        const row = Object.fromEntries(s.columns.map((c, i) => [c, v[i]]));
        const key = `${tags.site}|${tags.station ?? ''}|${tags.transect ?? ''}|${tags.sensor ?? ''}|${String(row.time)}`;
        got.set(key, [...(got.get(key) ?? []), row]);
      }
    }
    for (const r of list) {
      const tags = recordTags(r);
      const key = `${tags.site}|${tags.station ?? ''}|${tags.transect ?? ''}|${tags.sensor ?? ''}|${Date.parse(r.t)}`;
      const rows = got.get(key) ?? [];
      for (const [f, v] of numericFields(r, 'bool')) {
        checked++;
        const ok = rows.some((row) =>
          typeof v === 'number' ? typeof row[f] === 'number' && close(row[f] as number, v) : row[f] === v,
        );
        if (!ok) mismatches.push({ record: `${type}|${key}`, field: f, want: v, got: rows.map((x) => x[f]) });
      }
    }
  }
  return { checked, mismatches, tagKeys };
}

/** Reads a Kafka topic from the start until `n` messages arrived (or `timeoutMs` passed). */
export async function consumeKafka(
  brokers: readonly string[],
  topic: string,
  n: number,
  timeoutMs = 60_000,
): Promise<{ key: string; value: string }[]> {
  const kafka = new Kafka({ clientId: 'reefd-e2e', brokers: [...brokers], logLevel: logLevel.NOTHING });
  const consumer = kafka.consumer({ groupId: `reefd-e2e-${topic}`, heartbeatInterval: 500 });
  const out: { key: string; value: string }[] = [];
  await consumer.connect();
  try {
    await consumer.subscribe({ topic, fromBeginning: true });
    let done: () => void = () => {};
    const finished = new Promise<void>((r) => (done = r));
    await consumer.run({
      eachMessage: async ({ message }) => {
        out.push({ key: message.key?.toString() ?? '', value: message.value?.toString() ?? '' });
        if (out.length >= n) done();
      },
    });
    await Promise.race([finished, new Promise((r) => setTimeout(r, timeoutMs))]);
  } finally {
    await consumer.disconnect();
  }
  return out;
}
