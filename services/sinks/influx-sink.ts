// Derived records to a time-series database as line protocol: the v2 write API (/api/v2/write of
// InfluxDB 2.x/3.x and VictoriaMetrics) or the v1 API (/write?db= of InfluxDB 1.x).
//
// Why our own HTTP writer and not @influxdata/influxdb-client's WriteApi: the client's close()/flush()
// resolve before batches it already sent are acknowledged (measured on this class of machine, docs/performance.md), it buffers and retries on
// its own, which would fight the disk spool, and it only speaks v2. One small writer gives both APIs, an
// exact "this batch is in the database" moment, and order (one batch in flight, spooled-sink.ts).
//
// Exactly once across crashes (records with stream positions, as the daemon writes them): each spooled line
// carries its position; a delivery ledger beside the spool (delivery-ledger.ts) holds the highest position
// the database confirmed, and lines at or below it are not sent again. The one batch a crash (or a lost
// answer) leaves unknown is checked against the database before it goes again (vm-presence.ts): InfluxDB
// overwrites a point written twice (same measurement, tag set and timestamp), so there nothing is asked;
// VictoriaMetrics keeps every copy, so there the batch's points are looked up and the ones it holds are
// left out.
//
// Replays (`reefd replay` loaded into a database) are another matter: VictoriaMetrics keeps both copies
// unless it runs with -dedup.minScrapeInterval (1ms is enough for reefd's ms timestamps); even then it keeps
// one of the copies, not necessarily the last (measured on 1.79), so a replay with changed values does not
// reliably replace old ones there: delete the time range first.
import { gzip as gzipCb } from 'node:zlib';
import { promisify } from 'node:util';
import { recordToLine } from '../../libs/lineproto/index.js';
import type { Logger } from '../log/logger.js';
import { DeliveryLedger, splitPosition, withPosition } from './delivery-ledger.js';
import type { Sleep } from '../transport/backoff.js';
import { tlsOptions, type TlsFiles } from '../transport/tls.js';
import { checkStatus, httpPost, mayHaveLanded } from './http.js';
import { createSpooledSink, type SpooledSink } from './spooled-sink.js';
import { keepsCopies, presentPoints, type PresenceTarget } from './vm-presence.js';

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
  /** Credentials refused (true) and accepted again (false): the daemon raises and clears an alert. */
  onAuth?: (failing: boolean, err?: Error) => void;
  /**
   * The delivery ledger (the daemon's outputs): its file and the stream's epoch. Without it the sink writes
   * every record it is given (replay, shore members).
   */
  ledger?: { file: string; epoch: string };
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
  const timeoutMs = o.timeoutMs ?? 10_000;
  const post = async (lines: readonly string[]): Promise<void> => {
    let body = Buffer.from(lines.join('\n') + '\n', 'utf8');
    const h = { ...headers };
    if ((o.gzip ?? true) && body.length > 1024) {
      body = await gzip(body);
      h['content-encoding'] = 'gzip';
    }
    const res = await httpPost(url, body, h, { timeoutMs, tls });
    checkStatus(res, name);
  };
  const ledger =
    o.ledger === undefined ? undefined : await DeliveryLedger.open(o.ledger.file, o.ledger.epoch);
  const guard =
    ledger === undefined
      ? undefined
      : new OnceGuard(ledger, { baseUrl: o.url, headers, tls, timeoutMs }, o.batchSize, o.logger, name);
  return createSpooledSink({
    name,
    encode: (r, pos) => {
      const e = recordToLine(r, o.api, { stringFields: o.stringFields ?? true });
      return e.ok ? { ok: true, entry: ledger === undefined ? e.line : withPosition(pos, e.line) } : e;
    },
    send: guard === undefined ? post : (entries) => guard.send(entries, post),
    batchSize: o.batchSize,
    flushMs: o.flushMs,
    logger: o.logger,
    maxMemoryLines: o.maxMemoryLines,
    backoff: o.backoff,
    random: o.random,
    sleep: o.sleep,
    onNearLimit: o.onNearLimit,
    onAuth: o.onAuth,
    closeDrainMs: o.closeDrainMs,
    spoolDir: o.spoolDir,
    spoolMaxBytes: o.spoolMaxMb * 1024 * 1024,
    onClose: async () => {
      await ledger?.close();
    },
  });
}

/**
 * Sends each stream position once: lines the ledger says the database holds are left out, and while a
 * batch's fate is unknown (after a crash, or a request that may have landed without an answer) the next
 * lines are looked up in the database first, for up to one batch.
 */
class OnceGuard {
  readonly #ledger: DeliveryLedger;
  readonly #target: PresenceTarget;
  readonly #batchSize: number;
  readonly #logger: Logger;
  readonly #name: string;
  /** Lines still to look up before sending (the size of the batch whose fate is unknown). */
  #unknown: number;
  #copies: boolean | undefined;

  constructor(
    ledger: DeliveryLedger,
    target: PresenceTarget,
    batchSize: number,
    logger: Logger,
    name: string,
  ) {
    this.#ledger = ledger;
    this.#target = target;
    this.#batchSize = batchSize;
    this.#logger = logger;
    this.#name = name;
    this.#unknown = ledger.uncleanStart ? batchSize : 0;
  }

  async send(entries: readonly string[], post: (lines: readonly string[]) => Promise<void>) {
    await this.#ledger.ready();
    const hwm = this.#ledger.hwm();
    let top = -1;
    let todo: { pos: number | undefined; body: string }[] = [];
    for (const e of entries) {
      const x = splitPosition(e);
      if (x.pos !== undefined) top = Math.max(top, x.pos);
      if (x.pos === undefined || x.pos > hwm) todo.push(x);
    }
    let skipped = entries.length - todo.length;
    if (this.#unknown > 0 && todo.length > 0) {
      const held = await this.#held(todo.map((x) => x.body));
      this.#unknown = held.some((h) => !h) ? 0 : Math.max(0, this.#unknown - todo.length);
      const before = todo.length;
      todo = todo.filter((_, i) => !held[i]);
      if (before > todo.length) {
        this.#logger.info(
          { sink: this.#name, held: before - todo.length },
          'database already held part of the batch in flight at the last stop; not sent again',
        );
      }
      skipped += before - todo.length;
    }
    if (todo.length > 0) {
      try {
        await post(todo.map((x) => x.body));
      } catch (err) {
        if (mayHaveLanded(err)) this.#unknown = this.#batchSize;
        throw err;
      }
    }
    if (top >= 0) await this.#ledger.delivered(new Map([[0, top]]));
    return { skipped };
  }

  async #held(lines: readonly string[]): Promise<boolean[]> {
    try {
      this.#copies ??= await keepsCopies(this.#target);
      if (!this.#copies) return lines.map(() => false);
      return await presentPoints(this.#target, lines);
    } catch (err) {
      // A write-only token cannot read back: sending beats blocking the output for good; at most the one
      // batch in flight at the stop is written twice. An outage is retried as any send.
      if ((err as { code?: string }).code !== 'REEFD_SINK_AUTH' && !/HTTP 4\d\d/.test((err as Error).message))
        throw err;
      this.#logger.warn(
        { sink: this.#name, err },
        'cannot read the database back; the batch in flight at the last stop may be written twice',
      );
      this.#copies = false;
      return lines.map(() => false);
    }
  }
}
