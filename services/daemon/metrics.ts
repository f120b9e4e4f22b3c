// Prometheus metrics of the daemon (prom-client), in one registry served at /metrics. Counters are counted
// where things happen; the state gauges (sources connected, sensors' last-seen age, active alerts) are read
// at each scrape from the running daemon through observe(), so they are never stale.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { Counter, Gauge, Histogram, Registry, collectDefaultMetrics } from 'prom-client';
import type { AlertRecord } from '../../libs/alerts/index.js';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { alertIdOf } from '../dashboard/alert-book.js';
import { packageRoot } from '../paths.js';

/** What the state gauges read at each scrape. */
export interface MetricsProbes {
  /** Wall-clock now, ms (the daemon's clock). */
  nowMs(): number;
  sources(): readonly { readonly name: string; connected(): boolean }[];
  /** Every sensor that has reported, with the event time of its last message (ms). */
  sensors(): readonly { station: string; sensor: string; kind: string; lastSeenMs: number }[];
  /** The alerts raised and not cleared. */
  activeAlerts(): readonly { rule: string; severity: string }[];
}

export interface BuildInfo {
  version: string;
  node: string;
}
import { watchEventLoop, type LoopWatch } from './stall.js';

export interface DaemonMetrics {
  registry: Registry;
  messagesIn: Counter<'kind'>;
  rejects: Counter<'reason'>;
  recordsOut: Counter<'type'>;
  sinkErrors: Counter<'sink'>;
  spoolBytes: Gauge<'sink'>;
  outputSkipped: Gauge<'sink'>;
  lagSeconds: Gauge;
  processSeconds: Histogram;
  late: Counter;
  duplicates: Counter;
  sensorReboots: Counter<'sensor'>;
  buildInfo: Gauge<'version' | 'node'>;
  sourceConnected: Gauge<'source'>;
  sensorLastSeenAge: Gauge<'station' | 'sensor' | 'kind'>;
  alertsActive: Gauge<'rule' | 'severity'>;
  /** Connects the state gauges to the running daemon; undefined disconnects them (they have no series). */
  observe(probes: MetricsProbes | undefined): void;
  /** Longest event-loop stall since the previous scrape (read and reset at each scrape). */
  loopStallMaxSeconds: Gauge;
  /** Resident set size now, and its peak since the process started (read at each scrape). */
  rssBytes: Gauge;
  rssPeakBytes: Gauge;
  /** Stops the event-loop watch (the daemon's stop, or the test that made the metrics). */
  close(): void;
}

/** The package version (package.json) and the Node.js version running it. */
export function buildInfo(): BuildInfo {
  const pkg = JSON.parse(readFileSync(path.join(packageRoot(), 'package.json'), 'utf8')) as {
    version: string;
  };
  return { version: pkg.version, node: process.version };
}

/** `loop`: the event-loop watch the stall gauge reads (closed with the metrics); one of its own by default. */
export function createMetrics(
  withDefaults = true,
  build: BuildInfo = buildInfo(),
  loop: LoopWatch = watchEventLoop(),
): DaemonMetrics {
  const registry = new Registry();
  if (withDefaults) collectDefaultMetrics({ register: registry, prefix: 'reefd_' });
  const r = [registry];
  let probes: MetricsProbes | undefined;
  const buildGauge = new Gauge({
    name: 'reefd_build_info',
    help: 'Always 1; the labels name the reefd version and the Node.js version running it',
    labelNames: ['version', 'node'],
    registers: r,
  });
  buildGauge.set({ version: build.version, node: build.node }, 1);
  return {
    registry,
    buildInfo: buildGauge,
    sourceConnected: new Gauge({
      name: 'reefd_source_connected',
      help: '1 while a source (MQTT broker, Kafka) is connected, else 0',
      labelNames: ['source'],
      registers: r,
      collect() {
        this.reset();
        for (const s of probes?.sources() ?? []) this.set({ source: s.name }, s.connected() ? 1 : 0);
      },
    }),
    sensorLastSeenAge: new Gauge({
      name: 'reefd_sensor_last_seen_age_seconds',
      help: 'Wall-clock seconds since the event time of the last message of each sensor that has reported',
      labelNames: ['station', 'sensor', 'kind'],
      registers: r,
      collect() {
        this.reset();
        if (probes === undefined) return;
        const now = probes.nowMs();
        for (const s of probes.sensors())
          this.set({ station: s.station, sensor: s.sensor, kind: s.kind }, (now - s.lastSeenMs) / 1000);
      },
    }),
    alertsActive: new Gauge({
      name: 'reefd_alerts_active',
      help: 'Alerts raised and not cleared, by rule and severity',
      labelNames: ['rule', 'severity'],
      registers: r,
      collect() {
        this.reset();
        const counts = new Map<string, { rule: string; severity: string; n: number }>();
        for (const a of probes?.activeAlerts() ?? []) {
          const key = `${a.rule}\u0000${a.severity}`;
          const c = counts.get(key) ?? { rule: a.rule, severity: a.severity, n: 0 };
          c.n++;
          counts.set(key, c);
        }
        for (const c of counts.values()) this.set({ rule: c.rule, severity: c.severity }, c.n);
      },
    }),
    observe(p) {
      probes = p;
    },
    close: () => loop.close(),
    loopStallMaxSeconds: new Gauge({
      name: 'reefd_event_loop_stall_max_seconds',
      help: 'Longest event-loop stall since the previous scrape (delay of a 20 ms timer beyond its interval)',
      registers: r,
      collect() {
        this.set(loop.takeStallMaxS());
      },
    }),
    rssBytes: new Gauge({
      name: 'reefd_memory_rss_bytes',
      help: 'Resident set size of the daemon process',
      registers: r,
      collect() {
        this.set(process.memoryUsage.rss());
      },
    }),
    rssPeakBytes: new Gauge({
      name: 'reefd_memory_rss_peak_bytes',
      help: 'Largest resident set size of the daemon process since it started',
      registers: r,
      collect() {
        // maxRSS is in kilobytes (getrusage).
        this.set(process.resourceUsage().maxRSS * 1024);
      },
    }),
    messagesIn: new Counter({
      name: 'reefd_messages_in_total',
      help: 'Messages received, by kind',
      labelNames: ['kind'],
      registers: r,
    }),
    rejects: new Counter({
      name: 'reefd_rejects_total',
      help: 'Messages rejected, by reason code',
      labelNames: ['reason'],
      registers: r,
    }),
    recordsOut: new Counter({
      name: 'reefd_records_out_total',
      help: 'Derived records emitted, by type',
      labelNames: ['type'],
      registers: r,
    }),
    sinkErrors: new Counter({
      name: 'reefd_sink_errors_total',
      help: 'Failed writes, by sink',
      labelNames: ['sink'],
      registers: r,
    }),
    spoolBytes: new Gauge({
      name: 'reefd_spool_bytes',
      help: 'Bytes waiting in a sink spool',
      labelNames: ['sink'],
      registers: r,
    }),
    outputSkipped: new Gauge({
      name: 'reefd_output_skipped_records',
      help: 'Records an output did not write again because it already held their stream position (since start)',
      labelNames: ['sink'],
      registers: r,
    }),
    lagSeconds: new Gauge({
      name: 'reefd_event_lag_seconds',
      help: 'Receive time minus event time of the last message',
      registers: r,
    }),
    processSeconds: new Histogram({
      name: 'reefd_process_seconds',
      help: 'Processing time per message (validation, archive hand-off, derivations)',
      buckets: [0.00001, 0.0001, 0.001, 0.01, 0.1, 1],
      registers: r,
    }),
    late: new Counter({
      name: 'reefd_late_messages_total',
      help: 'Messages later than the watermark',
      registers: r,
    }),
    duplicates: new Counter({
      name: 'reefd_duplicate_messages_total',
      help: 'Duplicates dropped',
      registers: r,
    }),
    sensorReboots: new Counter({
      name: 'reefd_sensor_reboots_total',
      help: 'Loggers whose seq counter started again (data kept), by station/sensor',
      labelNames: ['sensor'],
      registers: r,
    }),
  };
}

/** Ids kept of cleared alerts, so that a raise arriving after its clear is not counted again. */
const CLEARED_KEPT = 4096;

/**
 * The alerts raised and not cleared, from the alert records the daemon publishes (the processor's and the
 * operational ones: site silent, output refused, spool near its bound), seeded with those the processor
 * restored at start-up.
 */
export class ActiveAlerts {
  readonly #raised = new Map<string, { rule: string; severity: string }>();
  readonly #cleared = new Set<string>();

  seed(active: readonly DerivedRecord[]): void {
    this.observe(active);
  }

  observe(records: readonly DerivedRecord[]): void {
    for (const r of records) {
      if (r.type !== 'alert') continue;
      const a = r as unknown as AlertRecord;
      const id = alertIdOf(a);
      if (a.state === 'cleared') {
        this.#raised.delete(id);
        this.#cleared.add(id);
        if (this.#cleared.size > CLEARED_KEPT) this.#cleared.delete(this.#cleared.values().next().value!);
      } else if (!this.#cleared.has(id)) {
        this.#raised.set(id, { rule: a.rule, severity: a.severity });
      }
    }
  }

  list(): { rule: string; severity: string }[] {
    return [...this.#raised.values()];
  }
}
