// The shore's state store on a compacted Kafka topic (deploy/SCALING.md): key = site, value = the state
// entry JSON (gzip batches), cleanup.policy=compact so the topic keeps the latest entry per site. A reader
// follows the topic from its beginning in the background; load() first waits until the reader has reached
// the topic's end as of the call, so an entry the previous owner saved (acks = all) before it committed
// its offsets is always seen. Memory: the latest entry of every site, kept gzip-compressed.
import { randomBytes } from 'node:crypto';
import { gunzipSync, gzipSync } from 'node:zlib';
import { CompressionTypes, type Admin, type Consumer, type Producer } from 'kafkajs';
import type { Logger } from '../log/logger.js';
import { kafkaClient } from '../transport/kafka-client.js';
import type { TlsFiles } from '../transport/tls.js';
import { ScaleoutError, type SiteStateEntry, type SiteStateStore } from './state-store.js';

export interface KafkaStateStoreOptions {
  brokers: readonly string[];
  clientId: string;
  /** The state topic, by convention `<raw topic>.state`; created compacted when missing. */
  topic: string;
  tls?: TlsFiles | undefined;
  sasl?:
    | { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: string }
    | undefined;
  logger: Logger;
  /** load() gives up waiting for the reader after this long (default 30 s). */
  catchUpTimeoutMs?: number;
}

export interface KafkaStateStore extends SiteStateStore {
  close(): Promise<void>;
}

export async function createKafkaStateStore(o: KafkaStateStoreOptions): Promise<KafkaStateStore> {
  const client = kafkaClient(o);
  const admin: Admin = client.admin();
  await admin.connect();
  await admin.createTopics({
    topics: [
      {
        topic: o.topic,
        numPartitions: 1,
        configEntries: [
          { name: 'cleanup.policy', value: 'compact' },
          { name: 'max.message.bytes', value: String(8 * 1024 * 1024) },
        ],
      },
    ],
    waitForLeaders: true,
  });
  const producer: Producer = client.producer({ idempotent: true, maxInFlightRequests: 1 });
  await producer.connect();

  const latest = new Map<string, Buffer>();
  const reached = new Map<number, bigint>();
  let waiters: (() => void)[] = [];
  // A private group that never commits: every member reads the whole topic.
  const reader: Consumer = client.consumer({
    groupId: `${o.clientId}-state-${randomBytes(6).toString('hex')}`,
    maxBytes: 16 * 1024 * 1024,
  });
  await reader.connect();
  await reader.subscribe({ topics: [o.topic], fromBeginning: true });
  await reader.run({
    autoCommit: false,
    eachMessage: async ({ partition, message }) => {
      const site = message.key?.toString('utf8');
      if (site !== undefined) {
        if (message.value === null) latest.delete(site);
        else latest.set(site, gzipSync(message.value));
      }
      reached.set(partition, BigInt(message.offset) + 1n);
      const w = waiters;
      waiters = [];
      for (const f of w) f();
    },
  });

  async function catchUp(): Promise<void> {
    const ends = await admin.fetchTopicOffsets(o.topic);
    const deadline = Date.now() + (o.catchUpTimeoutMs ?? 30_000);
    const behind = () => ends.some((e) => (reached.get(e.partition) ?? 0n) < BigInt(e.high));
    while (behind()) {
      if (Date.now() > deadline)
        throw new ScaleoutError(
          'REEFD_SCALEOUT_STATE_CORRUPT',
          `state topic ${o.topic} not read to its end within ${o.catchUpTimeoutMs ?? 30_000} ms; check the brokers`,
        );
      await new Promise<void>((r) => {
        waiters.push(r);
        setTimeout(r, 100);
      });
    }
  }

  return {
    async load(site) {
      await catchUp();
      const z = latest.get(site);
      if (z === undefined) return undefined;
      const e = JSON.parse(gunzipSync(z).toString('utf8')) as SiteStateEntry;
      if (e.site !== site || typeof e.offset !== 'string' || typeof e.state !== 'object')
        throw new ScaleoutError(
          'REEFD_SCALEOUT_STATE_CORRUPT',
          `state topic ${o.topic} holds no state entry for site ${site}; delete the key to start it cold`,
        );
      return e;
    },
    async save(entry) {
      await producer.send({
        topic: o.topic,
        acks: -1,
        compression: CompressionTypes.GZIP,
        messages: [{ key: entry.site, value: JSON.stringify(entry) }],
      });
    },
    async close() {
      await Promise.allSettled([reader.disconnect(), producer.disconnect(), admin.disconnect()]);
    },
  };
}
