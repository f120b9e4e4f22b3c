// The shore member's small HTTP front (`reefd shore --http`): /healthz for the service manager and the
// load balancer, /metrics for Prometheus. Bound to 127.0.0.1 unless told otherwise. The counters are read
// from the member's own statistics at each scrape, so they are never stale and cost nothing between scrapes.
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Counter, Gauge, Registry, collectDefaultMetrics } from 'prom-client';
import { buildInfo, type BuildInfo } from '../daemon/metrics.js';
import type { ShoreMember } from './shore.js';

export type ShorePhase = 'starting' | 'running' | 'stopping';

export interface ShoreHttpOptions {
  member: Pick<ShoreMember, 'stats' | 'assigned' | 'positions' | 'storedAt'>;
  phase: () => ShorePhase;
  host?: string;
  port: number;
  /** Process metrics (CPU, memory, event loop) as well; tests turn them off. */
  withDefaults?: boolean;
  build?: BuildInfo;
}

export interface ShoreHttp {
  /** The bound address, `host:port` (port 0 gives a free one). */
  address: string;
  registry: Registry;
  close(): Promise<void>;
}

/** The shore member's metrics, read from `member` at each scrape. */
export function shoreMetrics(
  member: ShoreHttpOptions['member'],
  withDefaults = true,
  build: BuildInfo = buildInfo(),
): Registry {
  const registry = new Registry();
  const registers = [registry];
  if (withDefaults) collectDefaultMetrics({ register: registry, prefix: 'reefd_' });
  new Gauge({
    name: 'reefd_build_info',
    help: 'Always 1; the labels name the reefd version and the Node.js version running it',
    labelNames: ['version', 'node'],
    registers,
  }).set({ version: build.version, node: build.node }, 1);
  new Counter({
    name: 'reefd_shore_messages_total',
    help: 'Raw messages met by this member, by outcome (processed, skipped as already in restored state, rejected, unknown_site)',
    labelNames: ['outcome'],
    registers,
    collect() {
      const s = member.stats();
      this.reset();
      this.inc({ outcome: 'processed' }, s.messages - s.rejected);
      this.inc({ outcome: 'skipped' }, s.skipped);
      this.inc({ outcome: 'rejected' }, s.rejected);
      this.inc({ outcome: 'unknown_site' }, s.unknownSite);
    },
  });
  const counter = (name: string, help: string, read: () => number) =>
    new Counter({
      name,
      help,
      registers,
      collect() {
        this.reset();
        this.inc(read());
      },
    });
  counter(
    'reefd_shore_duplicates_total',
    'Messages the processor dropped as duplicates',
    () => member.stats().duplicates,
  );
  counter('reefd_shore_records_total', 'Derived records handed to the outputs', () => member.stats().records);
  counter('reefd_shore_restores_total', 'Sites restored from the state store', () => member.stats().restores);
  counter(
    'reefd_shore_snapshots_total',
    'State stores followed by an offset commit',
    () => member.stats().snapshots,
  );
  new Gauge({
    name: 'reefd_shore_partitions_assigned',
    help: 'Partitions of the raw topic assigned to this member',
    registers,
    collect() {
      this.set(member.assigned().length);
    },
  });
  new Gauge({
    name: 'reefd_shore_unstored_messages',
    help: 'Messages applied since the last stored state, per partition once stored (a new owner replays them after a crash)',
    labelNames: ['partition'],
    registers,
    collect() {
      this.reset();
      const stored = member.storedAt();
      for (const [p, next] of member.positions()) {
        const at = stored.get(p);
        if (at !== undefined) this.set({ partition: String(p) }, Number(next - at));
      }
    },
  });
  return registry;
}

export async function startShoreHttp(o: ShoreHttpOptions): Promise<ShoreHttp> {
  const registry = shoreMetrics(o.member, o.withDefaults ?? true, o.build);
  const server: Server = createServer((req, res) => {
    const p = new URL(req.url ?? '/', 'http://shore.invalid').pathname;
    const send = (status: number, body: string, type = 'text/plain; charset=utf-8') => {
      res.writeHead(status, { 'content-type': type, 'cache-control': 'no-store' });
      res.end(req.method === 'HEAD' ? undefined : body);
    };
    if (req.method !== 'GET' && req.method !== 'HEAD') return send(405, 'GET only\n');
    if (p === '/healthz') {
      const phase = o.phase();
      return send(phase === 'running' ? 200 : 503, phase === 'running' ? 'ok\n' : `${phase}\n`);
    }
    if (p === '/metrics') {
      registry
        .metrics()
        .then((text) => send(200, text, registry.contentType))
        .catch((err: unknown) => send(500, `metrics failed: ${(err as Error).message}\n`));
      return;
    }
    send(404, 'the shore member serves /healthz and /metrics\n');
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(o.port, o.host ?? '127.0.0.1', () => {
      server.off('error', reject);
      resolve();
    });
  });
  const a = server.address() as AddressInfo;
  return {
    address: `${a.address}:${a.port}`,
    registry,
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
