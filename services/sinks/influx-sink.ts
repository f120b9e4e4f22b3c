// Derived records to a time-series database as line protocol: the v2 write API (/api/v2/write of
// InfluxDB 2.x/3.x and VictoriaMetrics) or the v1 API (/write?db= of InfluxDB 1.x).
//
// Why our own HTTP writer and not @influxdata/influxdb-client's WriteApi: the client's close()/flush()
// resolve before batches it already sent are acknowledged (measured on this class of machine, docs/performance.md), it buffers and retries on
// its own, which would fight the disk spool, and it only speaks v2. One small writer gives both APIs, an
// exact "this batch is in the database" moment, and order (one batch in flight, spooled-sink.ts).
//
// Idempotence: a point is identified by measurement, tag set and timestamp; writing it again overwrites it
// in InfluxDB. VictoriaMetrics keeps both copies unless it runs with -dedup.minScrapeInterval (1ms is
// enough for reefd's ms timestamps), which a deployment must set for replays to duplicate nothing; even
// then it keeps one of the copies, not necessarily the last (measured on 1.79), so a replay with changed
// values does not reliably replace old ones there: delete the time range first.
import { gzip as gzipCb } from 'node:zlib';
import { promisify } from 'node:util';
import { recordToLine } from '../../libs/lineproto/index.js';
import type { Logger } from '../log/logger.js';
import { checkStatus, httpPost, tlsOptions, type TlsFiles } from './http.js';
import type { Sleep } from './retry.js';
import { createSpooledSink, type SpooledSink } from './spooled-sink.js';

const gzip = promisify(gzipCb);

export interface InfluxSinkOptions {
  name?: string;
  url: string;
  api: 'v1' | 'v2';
  org?: string;
  bucket?: string;
  db?: string;
  /** v2 API token (resolved secret). */
  token?: string | undefined;
  /** v1 API credentials (password resolved by the caller). */
  username?: string | undefined;
  password?: string | undefined;
  tls?: TlsFiles | undefined;
  batchSize: number;
  flushMs: number;
  /** Folder of this sink's spool segments (e.g. `<data_dir>/spool/influx`). */
  spoolDir: string;
  spoolMaxMb: number;
  logger: Logger;
  /** Write string fields (sensor, ta_source, ...); false for VictoriaMetrics, which stores numbers only. */
  stringFields?: boolean;
  /** Gzip request bodies over 1 kB (default true; InfluxDB 1.x and VictoriaMetrics both accept it). */
  gzip?: boolean;
  timeoutMs?: number;
  maxMemoryLines?: number;
  backoff?: { baseMs: number; maxMs: number };
  random?: () => number;
  sleep?: Sleep;
  onNearLimit?: (s: { spoolBytes: number; maxBytes: number }) => void;
  /** close() waits up to this long for the spool to drain (default 5 s). */
  closeDrainMs?: number;
}

export type InfluxSink = SpooledSink;

function writeUrl(o: InfluxSinkOptions): URL {
  const base = new URL(o.url.endsWith('/') ? o.url : o.url + '/');
  let url: URL;
  if (o.api === 'v2') {
    url = new URL('api/v2/write', base);
    url.searchParams.set('org', o.org ?? 'reefd');
    url.searchParams.set('bucket', o.bucket ?? 'reefd');
  } else {
    url = new URL('write', base);
    url.searchParams.set('db', o.db ?? 'reefd');
  }
  url.searchParams.set('precision', 'ms');
  return url;
}

/** Opens the spool (replaying what an earlier run left) and starts the sink. */
export async function createInfluxSink(o: InfluxSinkOptions): Promise<InfluxSink> {
  const url = writeUrl(o);
  const tls = tlsOptions(o.tls);
  const headers: Record<string, string> = { 'content-type': 'text/plain; charset=utf-8' };
  if (o.token !== undefined) headers.authorization = `Token ${o.token}`;
  else if (o.username !== undefined) {
    headers.authorization = `Basic ${Buffer.from(`${o.username}:${o.password ?? ''}`).toString('base64')}`;
  }
  const name = o.name ?? `influx-${o.api}`;
  const send = async (lines: readonly string[]): Promise<void> => {
    let body = Buffer.from(lines.join('\n') + '\n', 'utf8');
    const h = { ...headers };
    if ((o.gzip ?? true) && body.length > 1024) {
      body = await gzip(body);
      h['content-encoding'] = 'gzip';
    }
    const res = await httpPost(url, body, h, { timeoutMs: o.timeoutMs ?? 10_000, tls });
    checkStatus(res, name);
  };
  return createSpooledSink({
    name,
    encode: (r) => {
      const e = recordToLine(r, o.api, { stringFields: o.stringFields ?? true });
      return e.ok ? { ok: true, entry: e.line } : e;
    },
    send,
    batchSize: o.batchSize,
    flushMs: o.flushMs,
    logger: o.logger,
    maxMemoryLines: o.maxMemoryLines,
    backoff: o.backoff,
    random: o.random,
    sleep: o.sleep,
    onNearLimit: o.onNearLimit,
    closeDrainMs: o.closeDrainMs,
    spoolDir: o.spoolDir,
    spoolMaxBytes: o.spoolMaxMb * 1024 * 1024,
  });
}
