// The live dashboard: plain node:http, JSON APIs, Server-Sent Events, static files. Bound to 127.0.0.1 by
// default; an optional token guards every route but /healthz for LAN use. No CORS headers: the page and
// its APIs share one origin, and POSTs must be JSON from that origin (a cross-site form cannot ack).
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { DerivedRecord, ReefdConfig } from '../../libs/contract/index.js';
import type { Logger } from '../log/logger.js';
import { requestToken, tokenMatches } from './auth.js';
import { alertIdOf, RecordHistory, type AlertEntry } from './history.js';
import { SseHub } from './sse.js';
import { loadStaticFiles } from './static-files.js';

/** One sensor's health as the daemon knows it (last message, supply voltage, QC flags). */
export interface SensorHealth {
  station: string;
  sensor: string;
  kind?: string;
  last_seen?: string | null;
  battery_v?: number | null;
  /** Worst QARTOD flag of the last sample (1 pass, 3 suspect, 4 fail, 9 missing). */
  qc_flag?: number | null;
  /** Active fault names (stale, flatline, range, spike, battery). */
  flags?: string[];
}

export interface DashboardOptions {
  host?: string;
  port?: number;
  token?: string;
  config: ReefdConfig;
  /** A history to serve, or records to seed a new 48-h history with. */
  history?: RecordHistory | readonly DerivedRecord[];
  onAck?: (alertId: string, by: string) => void | Promise<void>;
  logger: Pick<Logger, 'info' | 'warn' | 'error' | 'debug'>;
  /** Prometheus text for /metrics (the daemon passes prom-client's registry.metrics()). */
  metrics?: () => string | Promise<string>;
  /** /readyz answers 200 when this returns true (default: ready once listening). */
  ready?: () => boolean | Promise<boolean>;
  /** Per-sensor health from the daemon (last seen, battery, flags); merged with the fault alerts. */
  health?: () => SensorHealth[] | Promise<SensorHealth[]>;
  /** Further ports to try when the port is taken, before falling back to any free port (default 10);
   * 0 binds exactly `port` and rejects with EADDRINUSE if it is taken. */
  portAttempts?: number;
  now?: () => number;
}

export interface DashboardServer {
  url: string;
  port: number;
  history: RecordHistory;
  publish(records: readonly DerivedRecord[]): void;
  /** Shows a notice banner (the notifier's dashboard channel). */
  notify(message: { title: string; body?: string; severity?: string }): void;
  close(): Promise<void>;
}

const SECURITY_HEADERS = {
  'x-content-type-options': 'nosniff',
  'x-frame-options': 'DENY',
  'referrer-policy': 'no-referrer',
  'content-security-policy':
    "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; connect-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'",
};

function send(
  res: ServerResponse,
  status: number,
  body: string | Buffer,
  type = 'application/json; charset=utf-8',
): void {
  res.writeHead(status, { 'content-type': type, 'cache-control': 'no-store', ...SECURITY_HEADERS });
  res.end(body);
}
const json = (res: ServerResponse, status: number, value: unknown) =>
  send(res, status, JSON.stringify(value));

async function readBody(req: IncomingMessage, limit: number): Promise<string> {
  let size = 0;
  const chunks: Buffer[] = [];
  for await (const chunk of req) {
    size += (chunk as Buffer).length;
    if (size > limit) throw Object.assign(new Error('body too large'), { status: 413 });
    chunks.push(chunk as Buffer);
  }
  return Buffer.concat(chunks).toString('utf8');
}

function siteSummary(config: ReefdConfig) {
  return {
    site: config.site,
    reef_axis_deg: config.reef_axis_deg,
    stations: Object.entries(config.stations).map(([id, s]) => ({
      id,
      label: s.label ?? id,
      position: s.position ?? null,
      sensors: Object.entries(s.sensors).map(([sid, sc]) => ({
        id: sid,
        kind: sc.kind,
        label: sc.label ?? sid,
      })),
    })),
    transects: Object.entries(config.transects).map(([id, t]) => ({
      id,
      label: t.label ?? id,
      upstream: t.upstream,
      downstream: t.downstream,
      length_m: t.length_m,
    })),
  };
}

function alertView(a: AlertEntry) {
  return {
    id: a.id,
    raised_t: a.raisedT,
    ack: a.ack ? { by: a.ack.by, t: new Date(a.ack.atMs).toISOString() } : null,
    ...a.record,
    alert_id: a.id,
  };
}

async function listen(server: Server, host: string, port: number, attempts: number): Promise<number> {
  const tryPort = (p: number) =>
    new Promise<number>((resolve, reject) => {
      const onError = (err: NodeJS.ErrnoException) => {
        server.off('listening', onListening);
        reject(err);
      };
      const onListening = () => {
        server.off('error', onError);
        resolve((server.address() as AddressInfo).port);
      };
      server.once('error', onError);
      server.once('listening', onListening);
      server.listen(p, host);
    });
  // portAttempts 0 means exactly this port (fail if taken); otherwise the next ones, then any free port.
  const candidates =
    port === 0 || attempts === 0
      ? [port]
      : [...Array.from({ length: attempts + 1 }, (_, i) => port + i).filter((p) => p <= 65535), 0];
  let last: unknown;
  for (const p of candidates) {
    try {
      return await tryPort(p);
    } catch (err) {
      last = err;
      if ((err as NodeJS.ErrnoException).code !== 'EADDRINUSE') throw err;
    }
  }
  throw last;
}

export async function createDashboardServer(opts: DashboardOptions): Promise<DashboardServer> {
  const host = opts.host ?? '127.0.0.1';
  const now = opts.now ?? Date.now;
  const history = opts.history instanceof RecordHistory ? opts.history : new RecordHistory();
  if (Array.isArray(opts.history)) history.add(opts.history as readonly DerivedRecord[]);
  const files = loadStaticFiles();
  const hub = new SseHub();
  const site = siteSummary(opts.config);
  let listening = false;

  const health = async () => {
    const extra = opts.health ? await opts.health() : [];
    const byKey = new Map(extra.map((h) => [`${h.station}/${h.sensor}`, h]));
    const faults = new Map<string, string[]>();
    const battery = new Map<string, number>();
    for (const a of history.alerts()) {
      const r = a.record;
      if (r.class !== 'fault' || r.state !== 'raised' || !r.sensor || !r.station) continue;
      const key = `${r.station}/${r.sensor}`;
      faults.set(key, [...(faults.get(key) ?? []), r.fault ?? r.rule]);
      if (r.fault === 'battery' && r.value !== null) battery.set(key, r.value);
    }
    return site.stations.flatMap((st) =>
      st.sensors.map((s) => {
        const key = `${st.id}/${s.id}`;
        const h = byKey.get(key);
        return {
          station: st.id,
          sensor: s.id,
          kind: s.kind,
          last_seen: h?.last_seen ?? null,
          battery_v: h?.battery_v ?? battery.get(key) ?? null,
          qc_flag: h?.qc_flag ?? null,
          flags: [...new Set([...(h?.flags ?? []), ...(faults.get(key) ?? [])])],
        };
      }),
    );
  };

  const handle = async (req: IncomingMessage, res: ServerResponse): Promise<void> => {
    const url = new URL(req.url ?? '/', 'http://dashboard.invalid');
    const p = url.pathname;
    if (p === '/healthz')
      return send(res, listening ? 200 : 503, listening ? 'ok\n' : 'starting\n', 'text/plain; charset=utf-8');
    if (opts.token !== undefined && !tokenMatches(opts.token, requestToken(req, url))) {
      res.setHeader('www-authenticate', 'Bearer realm="reefd"');
      return json(res, 401, {
        error: 'REEFD_DASHBOARD_UNAUTHORIZED',
        message:
          'this dashboard needs its access token: add ?token=... to the address or send Authorization: Bearer ...',
      });
    }
    if (req.method === 'POST') {
      const m = /^\/api\/alerts\/([A-Za-z0-9_.:@|-]{1,128})\/ack$/.exec(p);
      if (!m) return json(res, 404, { error: 'REEFD_DASHBOARD_NOT_FOUND', message: `no POST route ${p}` });
      if (!/^application\/json\b/i.test(req.headers['content-type'] ?? '')) {
        return json(res, 415, {
          error: 'REEFD_DASHBOARD_JSON_ONLY',
          message: 'send the acknowledgement as application/json',
        });
      }
      const origin = req.headers.origin;
      if (origin !== undefined && origin !== 'null' && new URL(origin).host !== req.headers.host) {
        return json(res, 403, {
          error: 'REEFD_DASHBOARD_CROSS_ORIGIN',
          message: 'acknowledgements are accepted from the dashboard page only',
        });
      }
      const id = decodeURIComponent(m[1] as string);
      if (!history.alert(id))
        return json(res, 404, {
          error: 'REEFD_DASHBOARD_NO_ALERT',
          message: `no alert ${id} in the last 48 h`,
        });
      let by = 'dashboard';
      try {
        const text = await readBody(req, 4096);
        const body = text ? (JSON.parse(text) as { by?: unknown }) : {};
        if (typeof body.by === 'string' && body.by.trim()) by = body.by.trim().slice(0, 64);
      } catch (err) {
        const status = (err as { status?: number }).status ?? 400;
        return json(res, status, {
          error: 'REEFD_DASHBOARD_BAD_BODY',
          message: 'the body must be JSON like {"by": "name"} under 4 kB',
        });
      }
      await opts.onAck?.(id, by);
      const entry = history.acknowledge(id, by, now()) as AlertEntry;
      hub.send('ack', alertView(entry));
      return json(res, 200, { ok: true, alert: alertView(entry) });
    }
    if (req.method !== 'GET' && req.method !== 'HEAD')
      return json(res, 405, { error: 'REEFD_DASHBOARD_METHOD', message: 'GET or POST only' });
    switch (p) {
      case '/readyz': {
        const ok = listening && (opts.ready ? await opts.ready() : true);
        return send(res, ok ? 200 : 503, ok ? 'ready\n' : 'not ready\n', 'text/plain; charset=utf-8');
      }
      case '/metrics':
        if (!opts.metrics) return send(res, 404, 'no metrics registered\n', 'text/plain; charset=utf-8');
        return send(res, 200, await opts.metrics(), 'text/plain; version=0.0.4; charset=utf-8');
      case '/api/site':
        return json(res, 200, site);
      case '/api/records':
        return json(res, 200, {
          latest_t: history.latestMs ? new Date(history.latestMs).toISOString() : null,
          records: history.records(),
        });
      case '/api/alerts':
        return json(res, 200, { alerts: history.alerts().map(alertView) });
      case '/api/health':
        return json(res, 200, { sensors: await health() });
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
    json(res, 404, { error: 'REEFD_DASHBOARD_NOT_FOUND', message: `nothing at ${p}` });
  };

  const server = createServer((req, res) => {
    handle(req, res).catch((err: unknown) => {
      opts.logger.error({ err, url: req.url }, 'dashboard request failed');
      if (!res.headersSent)
        json(res, 500, { error: 'REEFD_DASHBOARD_INTERNAL', message: 'internal error; see the daemon log' });
      else res.end();
    });
  });
  server.keepAliveTimeout = 5000;
  const port = await listen(server, host, opts.port ?? 8080, opts.portAttempts ?? 10);
  listening = true;
  const urlHost = host.includes(':') ? `[${host}]` : host;
  const url = `http://${urlHost}:${port}`;
  if (opts.port !== undefined && opts.port !== 0 && port !== opts.port) {
    opts.logger.warn({ wanted: opts.port, port }, 'dashboard port was taken; bound the next free one');
  }
  opts.logger.info({ url }, 'dashboard listening');

  return {
    url,
    port,
    history,
    publish(records) {
      if (records.length === 0) return;
      history.add(records);
      hub.send('records', records);
      for (const r of records) {
        const entry = r.type === 'alert' ? history.alert(alertIdOf(r)) : undefined;
        if (entry) hub.send('alert', alertView(entry));
      }
    },
    notify(message) {
      hub.send('notice', { ...message, t: new Date(now()).toISOString() });
    },
    async close() {
      listening = false;
      hub.close();
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
