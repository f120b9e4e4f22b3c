// Proof that the dev/CI Kafka broker (single-node KRaft) works from the code with kafkajs:
// produce and consume keyed records on a fresh topic, and auto-create a topic with the
// broker's num.partitions=4 (deploy/dev/services.sh).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Kafka, Partitioners, logLevel, type Admin } from 'kafkajs';
import { KAFKA_BROKERS, itTopic, pollUntil, requireService } from '../env.js';

const kafka = new Kafka({
  clientId: 'reefd-it',
  brokers: [...KAFKA_BROKERS],
  logLevel: logLevel.WARN,
  connectionTimeout: 5_000,
  retry: { retries: 5, initialRetryTime: 200 },
});
let admin: Admin;
const created: string[] = [];

beforeAll(async () => {
  await requireService('kafka', KAFKA_BROKERS.join(','));
  admin = kafka.admin();
  await admin.connect();
});

afterAll(async () => {
  if (created.length > 0)
    await admin.deleteTopics({ topics: created, timeout: 10_000 }).catch(() => undefined);
  await admin?.disconnect();
});

describe('Kafka (real broker)', () => {
  it('produces 300 keyed records and a consumer group reads every one, in order per key', async () => {
    const topic = itTopic();
    created.push(topic);
    await admin.createTopics({
      topics: [{ topic, numPartitions: 3, replicationFactor: 1 }],
      waitForLeaders: true,
    });

    const keys = ['demo-reef/crest/ctd', 'demo-reef/back/o2', 'demo-reef/weather/met'];
    const perKey = 100;
    const producer = kafka.producer({ createPartitioner: Partitioners.DefaultPartitioner });
    await producer.connect();
    for (let seq = 0; seq < perKey; seq++) {
      await producer.send({
        topic,
        acks: -1,
        messages: keys.map((key) => ({ key, value: JSON.stringify({ v: 1, seq, key }) })),
      });
    }
    await producer.disconnect();

    // Consumers are at-least-once: a rebalance (e.g. while a fresh broker creates __consumer_offsets)
    // replays records whose offsets were not committed yet. Records are keyed by partition and offset,
    // so a replay lands on the same entry and the check below sees each stored record once.
    const got = new Map<string, { key: string; seq: number; partition: number; offset: bigint }>();
    const mismatched: string[] = [];
    const consumer = kafka.consumer({ groupId: topic, sessionTimeout: 10_000, heartbeatInterval: 1_000 });
    await consumer.connect();
    try {
      await consumer.subscribe({ topic, fromBeginning: true });
      await consumer.run({
        eachMessage: async ({ partition, message }) => {
          const key = message.key?.toString('utf8') ?? '';
          const value = JSON.parse(message.value?.toString('utf8') ?? '{}') as { seq: number; key: string };
          // Assert after the run: a throw inside eachMessage would make kafkajs retry the record.
          if (value.key !== key) mismatched.push(`${key} != ${value.key}`);
          got.set(`${partition}/${message.offset}`, {
            key,
            seq: value.seq,
            partition,
            offset: BigInt(message.offset),
          });
        },
      });
      await pollUntil(
        'all produced records',
        async () => (got.size >= keys.length * perKey ? true : undefined),
        60_000,
      );
    } finally {
      await consumer.disconnect();
    }
    expect(mismatched).toEqual([]);
    expect(got.size).toBe(keys.length * perKey);
    const expected = Array.from({ length: perKey }, (_, i) => i);
    for (const key of keys) {
      const records = [...got.values()].filter((r) => r.key === key);
      // Records with one key go to one partition, stored in send order (Kafka's ordering guarantee).
      expect(new Set(records.map((r) => r.partition)).size).toBe(1);
      records.sort((a, b) => (a.offset < b.offset ? -1 : 1));
      expect(records.map((r) => r.seq)).toEqual(expected);
    }
    await admin.deleteGroups([topic]).catch(() => undefined);
  }, 120_000);

  it('auto-creates a topic on first produce with the broker default of 4 partitions', async () => {
    const topic = itTopic();
    created.push(topic);
    const producer = kafka.producer({
      createPartitioner: Partitioners.DefaultPartitioner,
      allowAutoTopicCreation: true,
    });
    await producer.connect();
    try {
      const [meta] = await producer.send({ topic, acks: -1, messages: [{ key: 'k', value: 'v' }] });
      expect(meta?.errorCode).toBe(0);
    } finally {
      await producer.disconnect();
    }
    const { topics } = await admin.fetchTopicMetadata({ topics: [topic] });
    expect(topics[0]?.name).toBe(topic);
    expect(topics[0]?.partitions).toHaveLength(4);
    const offsets = await admin.fetchTopicOffsets(topic);
    expect(offsets.reduce((n, p) => n + Number(p.high), 0)).toBe(1);
  }, 60_000);
});
