// Prometheus metrics of the daemon (prom-client), in one registry served at /metrics.
import { Counter, Gauge, Histogram, Registry, collectDefaultMetrics } from 'prom-client';

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
}

export function createMetrics(withDefaults = true): DaemonMetrics {
  const registry = new Registry();
  if (withDefaults) collectDefaultMetrics({ register: registry, prefix: 'reefd_' });
  const r = [registry];
  return {
    registry,
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
