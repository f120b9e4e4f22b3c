// Which line-protocol points a database already holds, for the one batch whose fate a crash or a lost
// answer left unknown (influx-sink.ts). InfluxDB overwrites a point written again (same series and time),
// so there a second write is harmless and nothing is asked. VictoriaMetrics keeps every copy (unless it
// runs with deduplication), so there the batch is looked up with its export API before it is sent again:
// one request for the batch's series over the batch's time range.
import { ReefdError } from '../../libs/contract/index.js';
import type { TlsOptions } from '../transport/tls.js';
import { httpGetText, httpPost } from './http.js';

export interface SeriesPoint {
  measurement: string;
  tags: Record<string, string>;
  timeMs: number;
}

/** Reads one character after a backslash as itself (line protocol escapes). */
function unescape(s: string): string {
  return s.replace(/\\(.)/g, '$1');
}

/** Splits at unescaped occurrences of `sep`. */
function splitUnescaped(s: string, sep: string): string[] {
  const out: string[] = [];
  let cur = '';
  for (let i = 0; i < s.length; i++) {
    const c = s[i] as string;
    if (c === '\\' && i + 1 < s.length) {
      cur += c + (s[i + 1] as string);
      i++;
    } else if (c === sep) {
      out.push(cur);
      cur = '';
    } else cur += c;
  }
  out.push(cur);
  return out;
}

/** Measurement, tags and time of a line written by libs/lineproto (undefined for anything else). */
export function seriesPoint(line: string): SeriesPoint | undefined {
  let i = 0;
  for (; i < line.length; i++) {
    if (line[i] === '\\') i++;
    else if (line[i] === ' ') break;
  }
  const key = line.slice(0, i);
  const timeText = line.slice(line.lastIndexOf(' ') + 1);
  const timeMs = Number(timeText);
  if (i >= line.length || !Number.isFinite(timeMs)) return undefined;
  const [measurement, ...tagParts] = splitUnescaped(key, ',');
  if (measurement === undefined || measurement === '') return undefined;
  const pairs: [string, string][] = [];
  for (const t of tagParts) {
    const [k, v] = splitUnescaped(t, '=');
    if (k === undefined || v === undefined) return undefined;
    pairs.push([unescape(k), unescape(v)]);
  }
  // fromEntries defines own properties: a tag named __proto__ stays a tag.
  return { measurement: unescape(measurement), tags: Object.fromEntries(pairs), timeMs };
}

const seriesId = (measurement: string, tags: Record<string, string>): string =>
  JSON.stringify([measurement, Object.entries(tags).sort(([a], [b]) => (a < b ? -1 : 1))]);

const quoteLabel = (v: string): string => `"${v.replace(/\\/g, '\\\\').replace(/"/g, '\\"')}"`;
const escapeRegex = (s: string): string => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

export interface PresenceTarget {
  /** The database's base URL (the output's `url`). */
  baseUrl: string;
  headers: Record<string, string>;
  tls: TlsOptions;
  timeoutMs: number;
}

function apiUrl(t: PresenceTarget, path: string): URL {
  return new URL(path, t.baseUrl.endsWith('/') ? t.baseUrl : t.baseUrl + '/');
}

function unavailable(what: string, cause?: unknown): ReefdError {
  return new ReefdError('REEFD_SINK_UNAVAILABLE', `${what}`, { retriable: true, cause });
}

/**
 * True when the database keeps every copy of a point (VictoriaMetrics: its export API answers), false when
 * a point written twice is overwritten (InfluxDB: no such API). Throws (retriable) when it cannot tell.
 */
export async function keepsCopies(t: PresenceTarget): Promise<boolean> {
  const url = apiUrl(t, 'api/v1/export');
  url.searchParams.set('match[]', '{__name__="reefd_probe_none"}');
  let res;
  try {
    res = await httpGetText(url, t.headers, { timeoutMs: t.timeoutMs, tls: t.tls });
  } catch (err) {
    throw unavailable(`cannot ask ${url.origin} which database it is: ${(err as Error).message}`, err);
  }
  if (res.status >= 200 && res.status < 300) return true;
  if (res.status === 401 || res.status === 403)
    throw new ReefdError('REEFD_SINK_AUTH', `${url.origin} refused the credentials (HTTP ${res.status})`, {
      retriable: true,
    });
  if (res.status >= 500) throw unavailable(`${url.origin} answered HTTP ${res.status}`);
  return false;
}

/** For each line, whether the database already holds its point (any field of its series at its time). */
export async function presentPoints(t: PresenceTarget, lines: readonly string[]): Promise<boolean[]> {
  const points = lines.map(seriesPoint);
  const series = new Map<string, SeriesPoint>();
  let from = Infinity;
  let to = -Infinity;
  for (const p of points) {
    if (p === undefined) continue;
    series.set(seriesId(p.measurement, p.tags), p);
    from = Math.min(from, p.timeMs);
    to = Math.max(to, p.timeMs);
  }
  if (series.size === 0) return lines.map(() => false);
  const body = new URLSearchParams();
  for (const p of series.values()) {
    const labels = Object.entries(p.tags).map(([k, v]) => `${k}=${quoteLabel(v)}`);
    body.append('match[]', `{__name__=~"${escapeRegex(p.measurement)}_.+",${labels.join(',')}}`);
  }
  // Points written in the last second are searchable only once VictoriaMetrics has flushed them (a restart
  // can be that quick): ask it to flush first; an error here only means an older VictoriaMetrics.
  await httpGetText(apiUrl(t, 'internal/force_flush'), t.headers, {
    timeoutMs: t.timeoutMs,
    tls: t.tls,
  }).catch(() => undefined);
  body.set('start', String(from / 1000));
  body.set('end', String(to / 1000));
  let res;
  try {
    res = await httpPost(
      apiUrl(t, 'api/v1/export'),
      Buffer.from(body.toString()),
      { ...t.headers, 'content-type': 'application/x-www-form-urlencoded' },
      { timeoutMs: t.timeoutMs, tls: t.tls, maxBodyBytes: 256 * 1024 * 1024 },
    );
  } catch (err) {
    throw unavailable(`cannot read back the last batch: ${(err as Error).message}`, err);
  }
  if (res.status < 200 || res.status >= 300) throw unavailable(`export answered HTTP ${res.status}`);
  const held = new Set<string>();
  for (const text of res.body.split('\n')) {
    if (text.trim() === '') continue;
    const row = JSON.parse(text) as { metric: Record<string, string>; timestamps: number[] };
    const name = row.metric.__name__ ?? '';
    for (const [id, p] of series) {
      if (!name.startsWith(`${p.measurement}_`)) continue;
      if (!Object.entries(p.tags).every(([k, v]) => row.metric[k] === v)) continue;
      for (const ts of row.timestamps) held.add(`${id}|${ts}`);
    }
  }
  return points.map(
    (p) => p !== undefined && held.has(`${seriesId(p.measurement, p.tags)}|${Math.round(p.timeMs)}`),
  );
}
