// The HTTP front of the daemon: dashboard, /healthz, /readyz, /metrics (services/dashboard), with the
// dashboard's 48-h history persisted in the data folder so it survives a restart.
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import type { DerivedRecord, ReefdConfig } from '../../libs/contract/index.js';
import { resolveSecret } from '../config/load.js';
import { createDashboardServer, type DashboardServer } from '../dashboard/index.js';
import type { Logger } from '../log/logger.js';
import { writeFileAtomic } from './checkpoint.js';
import type { Daemon } from './daemon.js';

export interface HttpFront {
  url: string;
  publish(records: readonly DerivedRecord[]): void;
  close(): Promise<void>;
}

export interface HttpOptions {
  config: ReefdConfig;
  daemon: Daemon;
  logger: Logger;
  baseDir: string;
  env: Readonly<Record<string, string | undefined>>;
  port?: number;
  /** Try the following ports when the configured one is taken (the demo). */
  tryNextPorts: boolean;
  persistEveryMs?: number;
}

async function readHistory(file: string): Promise<DerivedRecord[]> {
  try {
    const text = await readFile(file, 'utf8');
    const out: DerivedRecord[] = [];
    for (const line of text.split('\n')) {
      if (line.length === 0) continue;
      try {
        out.push(JSON.parse(line) as DerivedRecord);
      } catch {
        // a damaged line of a cache file: skip it, the archive is the source of truth
      }
    }
    return out;
  } catch {
    return [];
  }
}

async function writeHistory(file: string, records: readonly DerivedRecord[]): Promise<void> {
  await writeFileAtomic(file, records.map((r) => JSON.stringify(r)).join('\n') + '\n');
}

export async function startHttp(o: HttpOptions): Promise<HttpFront> {
  const file = path.join(o.daemon.dataDir, 'dashboard-history.ndjson');
  const token = o.config.http.token ? await resolveSecret(o.config.http.token, o.env, o.baseDir) : undefined;
  const server: DashboardServer = await createDashboardServer({
    host: o.config.http.host,
    port: o.port ?? o.config.http.port,
    ...(token !== undefined ? { token } : {}),
    config: o.config,
    history: await readHistory(file),
    logger: o.logger,
    portAttempts: o.tryNextPorts ? 10 : 0,
    metrics: () => o.daemon.metrics.registry.metrics(),
    ready: () => o.daemon.ready(),
    health: () =>
      o.daemon.processor.sensorHealth().map((h) => ({
        station: h.station,
        sensor: h.sensor,
        kind: h.kind,
        last_seen: h.lastSeenMs > 0 ? new Date(h.lastSeenMs).toISOString() : null,
        battery_v: h.batteryV,
        qc_flag: h.flag,
      })),
    onAck: async (id, by) => {
      const r = await o.daemon.notifier.ack(id, by);
      if (!r.ok) o.logger.info({ id }, 'acknowledged on the dashboard only (not in the notification outbox)');
    },
  });
  o.daemon.setNoticeSink((m) => {
    const worst = m.alerts.some((a) => a.severity === 'critical') ? 'critical' : m.alerts[0]?.severity;
    server.notify({ title: m.subject, body: m.text, ...(worst !== undefined ? { severity: worst } : {}) });
  });
  const persist = () =>
    writeHistory(file, server.history.records()).catch((err: unknown) =>
      o.logger.warn({ err: (err as Error).message }, 'dashboard history not saved'),
    );
  const timer = setInterval(() => void persist(), o.persistEveryMs ?? 60_000);
  timer.unref();
  return {
    url: server.url,
    publish: (records) => server.publish(records),
    close: async () => {
      clearInterval(timer);
      await persist();
      await server.close();
    },
  };
}
