// Derived records to a Kafka topic: key `<site>/<station>` (or `<site>/<transect>` for fluxes), value the
// record's JSON. The producer is idempotent with acks = -1 (all in-sync replicas) and one request in flight,
// so kafkajs' own retries neither duplicate nor reorder within a partition. Outages longer than those
// retries go to the disk spool (spooled-sink.ts) and are replayed in order.
// A replay duplicates messages on the topic (Kafka is a log); a consumer that keeps the last value per
// key and record time `t` sees the same state, the same rule as the database's overwrite.
import {
  Kafka,
  logLevel,
  type CompressionTypes,
  type ICustomPartitioner,
  type Message,
  type Producer,
  type SASLOptions,
} from 'kafkajs';
import { ReefdError, type DerivedRecord } from '../../libs/contract/index.js';
import type { Logger } from '../log/logger.js';
import { tlsOptions, type TlsFiles } from './http.js';
import type { Sleep } from './retry.js';
import { createSpooledSink, type SpooledSink } from './spooled-sink.js';

export interface KafkaSinkOptions {
  name?: string;
  brokers: readonly string[];
  clientId: string;
  topic: string;
  tls?: TlsFiles | undefined;
  /** SASL with the password resolved by the caller. */
  sasl?:
    | { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: string }
    | undefined;
  batchSize?: number;
  flushMs?: number;
  spoolDir: string;
  spoolMaxMb: number;
  logger: Logger;
  backoff?: { baseMs: number; maxMs: number };
  sleep?: Sleep;
  /** close() waits up to this long for the spool to drain (default 5 s). */
  closeDrainMs?: number;
}

export function recordKey(r: DerivedRecord): string {
  return r.type === 'flux' ? `${r.site}/${r.transect}` : `${r.site}/${r.station ?? '-'}`;
}

/** kafkajs log lines through pino, at the levels kafkajs gives them. */
export function kafkaLogCreator(logger: Logger) {
  return () =>
    ({ level, log }: { level: number; log: { message: string } & Record<string, unknown> }) => {
      const { message, ...rest } = log;
      if (level === logLevel.ERROR) logger.error(rest, `kafka: ${message}`);
      else if (level === logLevel.WARN) logger.warn(rest, `kafka: ${message}`);
      else logger.debug(rest, `kafka: ${message}`);
    };
}

export function kafkaClient(o: {
  brokers: readonly string[];
  clientId: string;
  tls?: TlsFiles | undefined;
  sasl?: KafkaSinkOptions['sasl'];
  logger: Logger;
}): Kafka {
  const cfg: ConstructorParameters<typeof Kafka>[0] = {
    clientId: o.clientId,
    brokers: [...o.brokers],
    logLevel: logLevel.WARN,
    logCreator: kafkaLogCreator(o.logger),
    retry: { retries: 5, initialRetryTime: 300, maxRetryTime: 10_000 },
  };
  if (o.tls !== undefined) cfg.ssl = tlsOptions(o.tls);
  if (o.sasl !== undefined) cfg.sasl = { ...o.sasl } as SASLOptions;
  return new Kafka(cfg);
}

/** Kafka errors as the spooled sink understands them: retriable unless kafkajs says it is not. */
function toSinkError(err: unknown, topic: string): Error {
  const e = err as { name?: string; retriable?: boolean; message?: string };
  const retriable = !(e.name === 'KafkaJSProtocolError' && e.retriable === false);
  return new ReefdError(
    'REEFD_SINK_UNAVAILABLE',
    `Kafka produce to ${topic} failed: ${e.message ?? String(err)}`,
    {
      retriable,
      cause: err,
    },
  );
}

/**
 * An ordered, idempotent Kafka sender for the spooled pump: one producer, one request in flight, acks from
 * every replica, bounded retries (past them the batch goes to the disk spool). `toMessage` turns one queued
 * entry into a Kafka message. Shared by the derived-record sink and the edge bridge.
 */
export function orderedKafkaSender(
  client: Kafka,
  o: {
    topic: string;
    toMessage: (entry: string) => Message;
    compression?: CompressionTypes;
    createPartitioner?: ICustomPartitioner;
  },
): { send: (entries: readonly string[]) => Promise<void>; disconnect: () => Promise<void> } {
  const producer: Producer = client.producer({
    idempotent: true,
    maxInFlightRequests: 1,
    allowAutoTopicCreation: false,
    ...(o.createPartitioner ? { createPartitioner: o.createPartitioner } : {}),
    retry: { retries: 5, initialRetryTime: 300, maxRetryTime: 10_000 },
  });
  let connected = false;
  return {
    send: async (entries) => {
      try {
        if (!connected) {
          await producer.connect();
          connected = true;
        }
        await producer.send({
          topic: o.topic,
          acks: -1,
          ...(o.compression !== undefined ? { compression: o.compression } : {}),
          messages: entries.map(o.toMessage),
        });
      } catch (err) {
        throw toSinkError(err, o.topic);
      }
    },
    disconnect: () => producer.disconnect(),
  };
}

export async function createKafkaSink(o: KafkaSinkOptions): Promise<SpooledSink> {
  const { send, disconnect } = orderedKafkaSender(kafkaClient(o), {
    topic: o.topic,
    toMessage: (e) => {
      const [key, value] = JSON.parse(e) as [string, string];
      return { key, value };
    },
  });
  return createSpooledSink({
    name: o.name ?? 'kafka',
    // One spool entry: [key, value JSON]; JSON.stringify never emits a raw newline.
    encode: (r) => ({ ok: true, entry: JSON.stringify([recordKey(r), JSON.stringify(r)]) }),
    send,
    batchSize: o.batchSize ?? 500,
    flushMs: o.flushMs ?? 200,
    logger: o.logger,
    backoff: o.backoff,
    sleep: o.sleep,
    closeDrainMs: o.closeDrainMs,
    spoolDir: o.spoolDir,
    spoolMaxBytes: o.spoolMaxMb * 1024 * 1024,
    onClose: () => disconnect(),
  });
}
