// Edge mode, the forwarding half: every accepted raw message goes to the Kafka raw topic with the
// contract's record key `<site>/<station>/<sensor>` and value = the payload plus `site`, `station`,
// `kind`, `sensor` (contract section 1). The Kafka timestamp carries the edge's receive time, so the shore
// processor's timing QC sees the same receive time the edge archive holds. Delivery reuses the sinks'
// spooled, ordered pump (services/sinks/spooled-sink.ts): one batch in flight, a disk spool behind an
// outage, replayed oldest first. The partition is chosen by site (partition.ts).
import type { DerivedRecord, SensorMessage } from '../../libs/contract/index.js';
import type { Logger } from '../log/logger.js';
import type { SinkStats } from '../pipeline/types.js';
import { orderedKafkaSender } from '../sinks/kafka-sink.js';
import { openKafka } from '../transport/kafka-client.js';
import type { TlsFiles } from '../transport/tls.js';
import { createSpooledSink, type SpooledSink } from '../sinks/spooled-sink.js';
import { partitionKeyOf, type PartitionBy } from './partition.js';

export interface EdgeBridgeOptions {
  brokers: readonly string[];
  clientId: string;
  topic: string;
  partitionBy?: PartitionBy;
  tls?: TlsFiles | undefined;
  sasl?:
    | { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: string }
    | undefined;
  spoolDir: string;
  spoolMaxMb: number;
  logger: Logger;
  batchSize?: number;
  flushMs?: number;
  closeDrainMs?: number;
}

export interface EdgeBridge {
  /** Queues one accepted message (never throws for an outage: the spool takes it). */
  forward(message: SensorMessage, rxMs: number): void;
  /** Resolves when everything forwarded so far is at the broker or in the disk spool. */
  flush(): Promise<void>;
  close(): Promise<void>;
  stats(): SinkStats;
}

/** The contract's raw record: key and value JSON of one validated message. */
export function rawRecordOf(m: SensorMessage): { key: string; value: string } {
  const { tMs: _tMs, ...payload } = m;
  return { key: `${m.site}/${m.station}/${m.sensor}`, value: JSON.stringify(payload) };
}

/** One spool entry per message: `[key, value, rxMs]` as JSON (no raw newline). */
interface Queued {
  readonly entry: string;
}

export async function createEdgeBridge(o: EdgeBridgeOptions): Promise<EdgeBridge> {
  const by = o.partitionBy ?? 'site';
  const { send, disconnect } = orderedKafkaSender(openKafka(o), {
    topic: o.topic,
    compression: 'gzip',
    // The partition follows the site (or site/station) part of the key (partition.ts).
    partitionKey: (key) => partitionKeyOf(key, by),
    // The Kafka timestamp is the edge's receive time.
    toMessage: (e) => {
      const [key, value, rxMs] = JSON.parse(e) as [string, string, number];
      return { key, value, timestampMs: rxMs };
    },
  });
  // The spooled pump is typed on derived records; the bridge hands it pre-encoded entries instead, and
  // its encode() only unwraps them (the pump never looks inside what it queues).
  const sink: SpooledSink = await createSpooledSink({
    name: 'bridge-kafka',
    encode: (r) => ({ ok: true, entry: (r as unknown as Queued).entry }),
    send,
    batchSize: o.batchSize ?? 500,
    flushMs: o.flushMs ?? 100,
    logger: o.logger,
    closeDrainMs: o.closeDrainMs,
    spoolDir: o.spoolDir,
    spoolMaxBytes: o.spoolMaxMb * 1024 * 1024,
    onClose: () => disconnect(),
  });
  return {
    forward(m, rxMs) {
      const { key, value } = rawRecordOf(m);
      const q: Queued = { entry: JSON.stringify([key, value, rxMs]) };
      sink.write([q as unknown as DerivedRecord]);
    },
    flush: () => sink.flush(),
    close: () => sink.close(),
    stats: () => sink.stats(),
  };
}
