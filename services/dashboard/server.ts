// The live dashboard: plain node:http, JSON APIs described by /openapi.json, Server-Sent Events, static files.
// Bound to 127.0.0.1 by default; an optional token guards every route but /healthz for LAN use. No CORS
// headers: the page and its APIs share one origin, and POSTs must be JSON from that origin (a cross-site form
// cannot acknowledge an alert).
//
// Inputs are functions, so wiring it to the daemon is one line each: `subscribe` (the daemon's record bus),
// `activeAlerts` and `health` (the processor), `acks` (the notifier), `query` (a durable record store).
import { readFileSync } from 'node:fs';
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import path from 'node:path';
import type { DerivedRecord, RecordType, ReefdConfig } from '../../libs/contract/index.js';
import { errFields, type Logger } from '../log/logger.js';
import { packageRoot } from '../paths.js';
import { AlertBook, type AckStore } from './alert-book.js';
import { ackRequestSchema, historyQuerySchema, recordsQuerySchema, type SensorsBody } from './api-schemas.js';
import { requestToken, tokenMatches } from './auth.js';
import { fieldLogSource } from './field-log.js';
import { RecordHistory } from './history.js';
import { HistoryLog } from './history-log.js';
import { fail, json, listen, readBody, send, SECURITY_HEADERS } from './http-util.js';
import { openApiDocument } from './openapi.js';
import { historyRecordQuery, type RecordQuery } from './record-query.js';
import { SensorWatch, type SensorHealthRow } from './sensor-watch.js';
import { siteInfo } from './site-info.js';
import { SseHub } from './sse.js';
import { loadStaticFiles } from './static-files.js';

const HOUR_MS = 3_600_000;

export interface DashboardOptions {
  host?: string;
  port?: number;
  token?: string;
  config: ReefdConfig;
  /** Folder of the configuration file: calibration_file and logbook_file are relative to it. */
  baseDir?: string;
  /** The daemon's record bus: called with every batch of derived records; returns the unsubscribe. */
  subscribe?: (fn: (records: readonly DerivedRecord[]) => void) => () => void;
  /** Alerts raised and not cleared (the processor's), read once at start-up. */
  activeAlerts?: () => readonly DerivedRecord[];
  /** Per-sensor health rows (the processor's sensorHealth()). */
  health?: () => readonly SensorHealthRow[];
  /** The acknowledgement store (the notifier): without it alerts are listed but cannot be acknowledged. */
  acks?: AckStore;
  /** Durable records for /api/records; default the dashboard's own history. */
  query?: RecordQuery;
  /** Folder the history is saved to and read back from (omit: memory only). */
  historyDir?: string;
  historyWindowMs?: number;
  historyResolutionMs?: number;
  /** Least wall time between two reads of `health` while records stream in, ms (default 250). */
  healthPollMs?: number;
  /** How often the history's final buckets are appended to its folder, ms (default 10 s). */
  saveEveryMs?: number;
  /** Records to start from (previews and tests). */
  seed?: readonly DerivedRecord[];
  logger: Pick<Logger, 'info' | 'warn' | 'error' | 'debug'>;
  /** Prometheus text for /metrics (the daemon passes prom-client's registry.metrics()). */
  metrics?: () => string | Promise<string>;
  /** /readyz answers 200 when this returns true (default: ready once listening). */
  ready?: () => boolean | Promise<boolean>;
  /** Further ports to try when the port is taken, before falling back to any free port (default 10);
   * 0 binds exactly `port` and rejects with EADDRINUSE if it is taken. */
  portAttempts?: number;
  /** Wall clock, ms. */
  now?: () => number;
}

export interface DashboardServer {
  url: string;
  port: number;
  history: RecordHistory;
  /** Feeds a batch of records (what `subscribe` delivers; for callers without a bus). */
  publish(records: readonly DerivedRecord[]): void;
  /** Shows a notice banner (the notifier's dashboard channel). */
  notify(message: { title: string; body?: string; severity?: string }): void;
  /** Appends the history's final buckets now (the timer does this every saveEveryMs). */
  save(): Promise<void>;
  close(): Promise<void>;
}

const version = (): string =>
  (JSON.parse(readFileSync(path.join(packageRoot(), 'package.json'), 'utf8')) as { version: string }).version;

/** Query parameters as a plain object (the last value of a repeated name). */
const paramsOf = (url: URL): Record<string, string> => Object.fromEntries(url.searchParams.entries());

const badQuery = (res: ServerResponse, issues: { path: PropertyKey[]; message: string }[]) =>
  fail(
    res,
    400,
    'REEFD_DASHBOARD_BAD_QUERY',
    issues.map((i) => `${i.path.map(String).join('.') || 'query'}: ${i.message}`).join('; '),
  );

export async function createDashboardServer(opts: DashboardOptions): Promise<DashboardServer> {
  const host = opts.host ?? '127.0.0.1';
  const wall = opts.now ?? Date.now;
  const windowMs = opts.historyWindowMs ?? 48 * HOUR_MS;
  const log = opts.historyDir
    ? new HistoryLog({
        dir: opts.historyDir,
        windowMs,
        onError: (err) => opts.logger.warn(errFields(err), 'dashboard history not saved'),
      })
    : undefined;
  const history = new RecordHistory({
    windowMs,
    ...(opts.historyResolutionMs !== undefined ? { resolutionMs: opts.historyResolutionMs } : {}),
    ...(log ? { onFinal: (records) => log.append(records) } : {}),
  });
  const book = new AlertBook({ windowMs, acks: opts.acks });
  const sensors = new SensorWatch({
    config: opts.config,
    health: opts.health,
    wallClock: wall,
    ...(opts.healthPollMs !== undefined ? { minPollMs: opts.healthPollMs } : {}),
  });
  const fieldLog = fieldLogSource({ baseDir: opts.baseDir ?? process.cwd(), config: opts.config });
  const query = opts.query ?? historyRecordQuery(history);
  const files = loadStaticFiles();
  const hub = new SseHub();
  const site = siteInfo(opts.config, { windowMs, resolutionMs: history.resolutionMs });
  const api = openApiDocument(version());
  let listening = false;

  if (log) {
    const n = await log.load((batch) => {
      history.add(batch, true);
      sensors.observe(batch);
    });
    if (n > 0) opts.logger.info({ records: n, dir: log.dir }, 'dashboard history read back');
  }
  const ingest = (records: readonly DerivedRecord[]): void => {
    if (records.length === 0) return;
    history.add(records);
    sensors.observe(records);
    const changed = book.observe(records);
    hub.send(
      'records',
      records.filter((r) => r.type !== 'alert'),
    );
    for (const a of changed) hub.send('alert', a);
  };
  if (opts.seed) ingest(opts.seed);
  book.seed(opts.activeAlerts?.() ?? []);
  const offAck = opts.acks?.onAck((ev) => {
    const view = book.applyAck(ev);
    if (view) hub.send('alert', view);
  });
  const unsubscribe = opts.subscribe?.(ingest);

  /** The time "now" for the page: the wall clock, or the data's own time when it is far from it (a replay). */
  const refNowMs = (): number => {
    const latest = history.latestMs;
    const now = wall();
    return latest > 0 && Math.abs(now - latest) > 2 * HOUR_MS ? latest : now;
  };

  async function sensorsBody(): Promise<SensorsBody> {
    sensors.poll();
    const raised = book.raised();
    return {
      now: new Date(refNowMs()).toISOString(),
      sensors: sensors.views(raised, await fieldLog.get()),
      site_faults: raised.filter((a) => a.class === 'fault' && a.sensor === null),
    };
  }

  async function records(url: URL, res: ServerResponse): Promise<void> {
    const q = recordsQuerySchema.safeParse(paramsOf(url));
    if (!q.success) return badQuery(res, q.error.issues);
    const p = q.data;
    const latest = (await query.latestMs?.()) ?? (history.latestMs || refNowMs());
    const toMs = p.to !== undefined ? Date.parse(p.to) : latest + 1;
    const fromMs = p.from !== undefined ? Date.parse(p.from) : toMs - windowMs;
    if (!Number.isFinite(fromMs) || !Number.isFinite(toMs) || fromMs >= toMs)
      return fail(res, 400, 'REEFD_DASHBOARD_BAD_QUERY', 'from and to must be ISO times with from before to');
    const page = await query.query(
      {
        ...(p.type ? { types: p.type.split(',') as RecordType[] } : {}),
        ...(p.station !== undefined ? { station: p.station } : {}),
        ...(p.transect !== undefined ? { transect: p.transect } : {}),
        ...(p.sensor !== undefined ? { sensor: p.sensor } : {}),
        fromMs,
        toMs,
      },
      { limit: p.limit, ...(p.cursor !== undefined ? { cursor: p.cursor } : {}) },
    );
    json(res, 200, {
      source: query.source,
      from: new Date(fromMs).toISOString(),
      to: new Date(toMs).toISOString(),
      records: page.records,
      next_cursor: page.next ?? null,
    });
  }

  function historyBody(url: URL, res: ServerResponse): void {
    const q = historyQuerySchema.safeParse(paramsOf(url));
    if (!q.success) return badQuery(res, q.error.issues);
    const f = {
      ...(q.data.type ? { types: q.data.type.split(',') as RecordType[] } : {}),
      ...(q.data.station !== undefined ? { station: q.data.station } : {}),
      ...(q.data.transect !== undefined ? { transect: q.data.transect } : {}),
    };
    json(res, 200, {
      window_h: windowMs / HOUR_MS,
      resolution_min: history.resolutionMs / 60_000,
      latest_t: history.latestMs ? new Date(history.latestMs).toISOString() : null,
      records: q.data.part === 'latest' ? [] : history.records(f),
      latest: q.data.part === 'records' ? [] : history.latest(f),
    });
  }

  async function acknowledge(req: IncomingMessage, res: ServerResponse, id: string): Promise<void> {
    if (!/^application\/json\b/i.test(req.headers['content-type'] ?? ''))
      return fail(res, 415, 'REEFD_DASHBOARD_JSON_ONLY', 'send the acknowledgement as application/json');
    const origin = req.headers.origin;
    if (origin !== undefined && origin !== 'null' && new URL(origin).host !== req.headers.host)
      return fail(
        res,
        403,
        'REEFD_DASHBOARD_CROSS_ORIGIN',
        'acknowledgements are accepted from the dashboard page only',
      );
    let body: unknown;
    try {
      body = JSON.parse((await readBody(req, 4096)) || '{}');
    } catch (err) {
      const status = (err as { status?: number }).status ?? 400;
      return fail(
        res,
        status,
        'REEFD_DASHBOARD_BAD_BODY',
        'the body must be JSON like {"by": "name", "comment": "..."} under 4 kB',
      );
    }
    const b = ackRequestSchema.safeParse(body);
    if (!b.success)
      return fail(
        res,
        400,
        'REEFD_DASHBOARD_ACK_NAME',
        'say who acknowledges: {"by": "your name", "comment": "optional"}',
      );
    const r = await book.ack(id, b.data.by, b.data.comment);
    if (!r.ok) return fail(res, r.status, r.code, r.message);
    hub.send('alert', r.alert);
    json(res, 200, { ok: true, alert: r.alert });
  }

  const handle = async (req: IncomingMessage, res: ServerResponse): Promise<void> => {
    const url = new URL(req.url ?? '/', 'http://dashboard.invalid');
    const p = url.pathname;
    if (p === '/healthz')
      return send(res, listening ? 200 : 503, listening ? 'ok\n' : 'starting\n', 'text/plain; charset=utf-8');
    if (opts.token !== undefined && !tokenMatches(opts.token, requestToken(req, url))) {
      res.setHeader('www-authenticate', 'Bearer realm="reefd"');
      return fail(
        res,
        401,
        'REEFD_DASHBOARD_UNAUTHORIZED',
        'this dashboard needs its access token: add ?token=... to the address or send Authorization: Bearer ...',
      );
    }
    if (req.method === 'POST') {
      const m = /^\/api\/alerts\/([A-Za-z0-9_.:@|-]{1,128})\/ack$/.exec(p);
      if (!m) return fail(res, 404, 'REEFD_DASHBOARD_NOT_FOUND', `no POST route ${p}`);
      return acknowledge(req, res, decodeURIComponent(m[1] as string));
    }
    if (req.method !== 'GET' && req.method !== 'HEAD')
      return fail(res, 405, 'REEFD_DASHBOARD_METHOD', 'GET or POST only');
    switch (p) {
      case '/readyz': {
        const ok = listening && (opts.ready ? await opts.ready() : true);
        return send(res, ok ? 200 : 503, ok ? 'ready\n' : 'not ready\n', 'text/plain; charset=utf-8');
      }
      case '/metrics':
        if (!opts.metrics) return send(res, 404, 'no metrics registered\n', 'text/plain; charset=utf-8');
        return send(res, 200, await opts.metrics(), 'text/plain; version=0.0.4; charset=utf-8');
      case '/openapi.json':
        return json(res, 200, api);
      case '/api/site':
        return json(res, 200, site);
      case '/api/history':
        return historyBody(url, res);
      case '/api/records':
        return records(url, res);
      case '/api/alerts':
        return json(res, 200, { alerts: book.list() });
      case '/api/sensors':
        return json(res, 200, await sensorsBody());
      case '/api/fieldlog':
        return json(res, 200, await fieldLog.get());
      case '/api/events':
        hub.add(res);
        return;
    }
    const f = files.get(p);
    if (f) {
      res.writeHead(200, {
        'content-type': f.type,
        'cache-control': p === '/' ? 'no-store' : 'max-age=300',
        ...SECURITY_HEADERS,
      });
      res.end(req.method === 'HEAD' ? undefined : f.body);
      return;
    }
    fail(res, 404, 'REEFD_DASHBOARD_NOT_FOUND', `nothing at ${p}`);
  };

  const server = createServer((req, res) => {
    handle(req, res).catch((err: unknown) => {
      opts.logger.error({ ...errFields(err), url: req.url }, 'dashboard request failed');
      if (!res.headersSent) fail(res, 500, 'REEFD_DASHBOARD_INTERNAL', 'internal error; see the daemon log');
      else res.end();
    });
  });
  server.keepAliveTimeout = 5000;
  const port = await listen(server, host, opts.port ?? 8080, opts.portAttempts ?? 10);
  listening = true;
  const urlHost = host.includes(':') ? `[${host}]` : host;
  const url = `http://${urlHost}:${port}`;
  if (opts.port !== undefined && opts.port !== 0 && port !== opts.port)
    opts.logger.warn({ wanted: opts.port, port }, 'dashboard port was taken; bound the next free one');
  opts.logger.info({ url }, 'dashboard listening');
  const saveTimer = log
    ? setInterval(() => void log.save().catch(() => undefined), opts.saveEveryMs ?? 10_000)
    : undefined;
  saveTimer?.unref();

  const save = async (): Promise<void> => {
    await log?.save();
  };

  return {
    url,
    port,
    history,
    publish: ingest,
    notify(message) {
      hub.send('notice', { ...message, t: new Date(wall()).toISOString() });
    },
    save,
    async close() {
      listening = false;
      unsubscribe?.();
      offAck?.();
      clearInterval(saveTimer);
      if (log) {
        log.append(history.openBuckets());
        await log.save().catch(() => undefined);
      }
      hub.close();
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
