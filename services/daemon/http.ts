// The HTTP front of the daemon: dashboard, /healthz, /readyz, /metrics (services/dashboard), with the
// dashboard's history saved incrementally in the data folder so a restart shows the last 48 h at once.
import { rm } from 'node:fs/promises';
import path from 'node:path';
import type { ReefdConfig } from '../../libs/contract/index.js';
import { resolveSecret } from '../config/load.js';
import { createDashboardServer, recordStoreQuery, type DashboardServer } from '../dashboard/index.js';
import type { Logger } from '../log/logger.js';
import { alertsStateDir, watchAcks } from '../notifiers/index.js';
import { createRecordStore, recordsDir } from '../records/index.js';
import type { Daemon } from './daemon.js';
import { errFields } from '../log/logger.js';

export interface HttpFront {
  url: string;
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
}

export async function startHttp(o: HttpOptions): Promise<HttpFront> {
  const logger = o.logger.child({ component: 'http' });
  const token = o.config.http.token ? await resolveSecret(o.config.http.token, o.env, o.baseDir) : undefined;
  // The one-file history of earlier versions, rewritten whole every minute: replaced by dashboard-history/.
  await rm(path.join(o.daemon.dataDir, 'dashboard-history.ndjson'), { force: true });
  // The durable record history behind /api/records (services/records), kept as long as the raw archive.
  // Until the daemon writes it as one of its outputs, the HTTP front appends what the record bus delivers.
  const store = await createRecordStore({
    dir: recordsDir(o.daemon.dataDir),
    retentionDays: o.config.archive.retention_days,
    clock: Date.now,
  });
  const offStore = o.daemon.bus.subscribe((records) => {
    store
      .append(records)
      .catch((err: unknown) => logger.warn(errFields(err), 'records not kept for /api/records'));
  });
  const maintain = setInterval(() => void store.maintain().catch(() => undefined), 3_600_000);
  maintain.unref();
  const server: DashboardServer = await createDashboardServer({
    host: o.config.http.host,
    port: o.port ?? o.config.http.port,
    ...(token !== undefined ? { token } : {}),
    config: o.config,
    baseDir: o.baseDir,
    subscribe: (fn) => o.daemon.bus.subscribe(fn),
    activeAlerts: () => o.daemon.processor.activeAlerts(),
    health: () => o.daemon.processor.sensorHealth(),
    acks: o.daemon.notifier,
    query: recordStoreQuery(store, 'record history'),
    historyDir: path.join(o.daemon.dataDir, 'dashboard-history'),
    logger,
    portAttempts: o.tryNextPorts ? 10 : 0,
    metrics: () => o.daemon.metrics.registry.metrics(),
    ready: () => o.daemon.ready(),
  });
  // `reefd alerts ack` appends to the notifier's journal: the page shows it within a second or two.
  const acks = watchAcks(alertsStateDir(o.daemon.dataDir), () => void o.daemon.notifier.syncAcks(), {
    onError: (err) =>
      logger.debug(errFields(err), 'no watch on the acknowledgement journal; read every 30 s'),
  });
  // The notifier's dashboard channel: its notices on the page's banner, until the page closes.
  const offNotices = o.daemon.notices.subscribe((m) => {
    const worst = m.alerts.some((a) => a.severity === 'critical') ? 'critical' : m.alerts[0]?.severity;
    server.notify({ title: m.subject, body: m.text, ...(worst !== undefined ? { severity: worst } : {}) });
  });
  return {
    url: server.url,
    close: async () => {
      offStore();
      offNotices();
      acks.close();
      clearInterval(maintain);
      await server.close();
      await store.close();
    },
  };
}
