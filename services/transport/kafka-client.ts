// The Kafka client of every service (intake, outputs, edge bridge, shore member, state store): brokers,
// TLS, SASL and kafkajs' log lines through the service's logger, with the same bounded retries everywhere.
import {
  CompressionTypes,
  Kafka,
  Partitioners,
  logLevel,
  type Message,
  type PartitionerArgs,
  type SASLOptions,
} from 'kafkajs';
import type { Logger } from '../log/logger.js';
import { readPartitionTails, type PartitionTails } from './kafka-tail.js';
import { tlsOptions, type TlsFiles } from './tls.js';

/** SASL with the password resolved by the caller. */
export type KafkaSasl =
  { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: string } | undefined;

export interface KafkaClientOptions {
  brokers: readonly string[];
  clientId: string;
  tls?: TlsFiles | undefined;
  sasl?: KafkaSasl;
  logger: Logger;
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

export function kafkaClient(o: KafkaClientOptions): Kafka {
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

// ---------------------------------------------------------------------------------------------------------
// The operations reefd needs from Kafka, as one small interface of ours (docs/kafka-client.md): callers
// written against it do not see kafkajs, so the client library can be replaced behind openKafka() alone.
// Still on kafkajs directly (consumer groups with manual commit): services/sources/kafka-source.ts,
// services/scaleout/shore.ts, services/scaleout/kafka-state-store.ts, services/daemon/build-io.ts.

/** One message to produce; `partition` unset = the default partitioner on `partitionKey(key)`. */
export interface KafkaOutMessage {
  key: string;
  value: string;
  partition?: number;
  /** The message timestamp (ms since the epoch); unset = the broker's or producer's time. */
  timestampMs?: number;
  headers?: Record<string, string>;
}

export interface OrderedProducerOptions {
  compression?: 'gzip';
  /** What the default partitioner hashes instead of the whole key (e.g. the site part of it). */
  partitionKey?: (key: string) => string;
}

/** Idempotent, acks from every in-sync replica, one request in flight: no duplicates, no reordering. */
export interface OrderedProducer {
  send(topic: string, messages: readonly KafkaOutMessage[]): Promise<void>;
  disconnect(): Promise<void>;
}

export interface KafkaPartitionOffsets {
  partition: number;
  /** First offset still held, and the next offset to be written. */
  low: bigint;
  high: bigint;
}

export interface KafkaTopicSpec {
  topic: string;
  partitions: number;
  /** Unset = the broker's default. */
  replicationFactor?: number;
  configs?: Record<string, string>;
}

export interface KafkaAdmin {
  /** Creates the topic; false when it already exists. */
  createTopic(spec: KafkaTopicSpec): Promise<boolean>;
  topicOffsets(topic: string): Promise<KafkaPartitionOffsets[]>;
  partitionCount(topic: string): Promise<number>;
  disconnect(): Promise<void>;
}

export interface ReefdKafka {
  orderedProducer(o?: OrderedProducerOptions): OrderedProducer;
  /** A connected admin client; disconnect it when done. */
  admin(): Promise<KafkaAdmin>;
  /** The highest `reefd-pos` of `epoch` in the last `scan` messages of each partition (kafka-tail.ts). */
  readTail(topic: string, epoch: string, scan: number): Promise<PartitionTails>;
  /** The partition the default (murmur2) partitioner gives `key` on a topic of `partitions` partitions. */
  defaultPartition(key: string, partitions: number): number;
}

/** False only for errors the client marks final (a protocol refusal); outages and timeouts are retriable. */
export function kafkaRetriable(err: unknown): boolean {
  const e = err as { name?: string; retriable?: boolean } | null;
  return !(e?.name === 'KafkaJSProtocolError' && e.retriable === false);
}

const metadataOf = (partitions: number) =>
  Array.from({ length: partitions }, (_, i) => ({
    partitionId: i,
    leader: 0,
    replicas: [],
    isr: [],
    partitionErrorCode: 0,
  }));

/** The kafkajs implementation of ReefdKafka. */
export function openKafka(o: KafkaClientOptions): ReefdKafka {
  const kafka = kafkaClient(o);
  const hash = Partitioners.DefaultPartitioner();
  return {
    orderedProducer(po = {}) {
      const partitionKey = po.partitionKey;
      const producer = kafka.producer({
        idempotent: true,
        maxInFlightRequests: 1,
        allowAutoTopicCreation: false,
        ...(partitionKey === undefined
          ? {}
          : {
              createPartitioner: () => {
                const inner = Partitioners.DefaultPartitioner();
                return (args: PartitionerArgs) =>
                  inner({
                    ...args,
                    message: { ...args.message, key: partitionKey(keyText(args.message.key)) },
                  });
              },
            }),
        retry: { retries: 5, initialRetryTime: 300, maxRetryTime: 10_000 },
      });
      let connected = false;
      return {
        async send(topic, messages) {
          if (!connected) {
            await producer.connect();
            connected = true;
          }
          await producer.send({
            topic,
            acks: -1,
            ...(po.compression === 'gzip' ? { compression: CompressionTypes.GZIP } : {}),
            messages: messages.map(toKafkajs),
          });
        },
        disconnect: () => producer.disconnect(),
      };
    },
    async admin() {
      const admin = kafka.admin();
      await admin.connect();
      return {
        createTopic: (t) =>
          admin.createTopics({
            waitForLeaders: true,
            topics: [
              {
                topic: t.topic,
                numPartitions: t.partitions,
                ...(t.replicationFactor === undefined ? {} : { replicationFactor: t.replicationFactor }),
                configEntries: Object.entries(t.configs ?? {}).map(([name, value]) => ({ name, value })),
              },
            ],
          }),
        topicOffsets: async (topic) =>
          (await admin.fetchTopicOffsets(topic)).map((p) => ({
            partition: p.partition,
            low: BigInt(p.low),
            high: BigInt(p.high),
          })),
        partitionCount: async (topic) => {
          const meta = await admin.fetchTopicMetadata({ topics: [topic] });
          return meta.topics[0]?.partitions.length ?? 1;
        },
        disconnect: () => admin.disconnect(),
      };
    },
    readTail: (topic, epoch, scan) => readPartitionTails(kafka, topic, epoch, scan),
    defaultPartition: (key, partitions) =>
      hash({ topic: '-', partitionMetadata: metadataOf(partitions), message: { key, value: null } }),
  };
}

const keyText = (key: Buffer | string | null | undefined): string =>
  key === null || key === undefined ? '' : typeof key === 'string' ? key : key.toString('utf8');

function toKafkajs(m: KafkaOutMessage): Message {
  const out: Message = { key: m.key, value: m.value };
  if (m.partition !== undefined) out.partition = m.partition;
  if (m.timestampMs !== undefined) out.timestamp = String(m.timestampMs);
  if (m.headers !== undefined) out.headers = m.headers;
  return out;
}
