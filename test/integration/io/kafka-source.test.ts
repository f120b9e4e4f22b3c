// The Kafka source against the real broker: the topic is rebuilt in the MQTT shape, and offsets are
// committed only as far as ack() was called, so an unacknowledged message is delivered again.
import { describe, it, expect, beforeAll } from 'vitest';
import { Kafka, logLevel } from 'kafkajs';
import { createKafkaSource, type KafkaSource } from '../../../services/sources/kafka-source.js';
import type { RawInput } from '../../../services/pipeline/types.js';
import { KAFKA_BROKERS, itTopic, pollUntil, randomSuffix, requireService } from '../env.js';
import { quietLogger } from './fixtures.js';

const kafka = new Kafka({ clientId: 'reefd-it', brokers: [...KAFKA_BROKERS], logLevel: logLevel.NOTHING });

beforeAll(async () => {
  await requireService('Kafka', KAFKA_BROKERS[0] ?? '');
});

function source(topic: string, groupId: string): KafkaSource {
  return createKafkaSource({
    brokers: KAFKA_BROKERS,
    clientId: 'reefd-it',
    groupId,
    topic,
    topicPrefix: 'reef',
    logger: quietLogger(),
    heartbeatMs: 200,
  });
}

const seqOf = (m: RawInput): number => (JSON.parse(Buffer.from(m.payload).toString()) as { seq: number }).seq;

describe('Kafka source', () => {
  it('rebuilds MQTT topics and commits offsets only up to the first unacknowledged message', async () => {
    const topic = itTopic();
    const admin = kafka.admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic, numPartitions: 1 }], waitForLeaders: true });
    const producer = kafka.producer();
    await producer.connect();
    await producer.send({
      topic,
      acks: -1,
      messages: [1, 2, 3, 4, 5].map((seq) => ({
        key: 'demo-reef/crest/c1',
        value: JSON.stringify({
          v: 1,
          t: '2026-12-02T00:00:00Z',
          seq,
          site: 'demo-reef',
          station: 'crest',
          kind: 'ctd',
          sensor: 'c1',
          temp_c: 27.1,
          sal: 35.2,
        }),
      })),
    });
    await producer.disconnect();
    const groupId = `reefd-it-${randomSuffix()}`;

    const a = source(topic, groupId);
    const gotA: RawInput[] = [];
    await a.start((m) => gotA.push(m));
    await pollUntil('5 messages at source A', async () => (gotA.length === 5 ? true : undefined), 30_000);
    expect(a.connected()).toBe(true);
    expect(gotA.map(seqOf)).toEqual([1, 2, 3, 4, 5]);
    expect(gotA[0]?.topic).toBe('reef/demo-reef/crest/ctd/c1');
    for (const i of [0, 1, 3, 4]) gotA[i]?.ack(); // seq 3 is never acknowledged
    expect(a.unacked()).toBe(1);
    await new Promise((r) => setTimeout(r, 500));
    await a.stop();

    const offsets = await admin.fetchOffsets({ groupId, topics: [topic] });
    // Committed offset = next offset to read: seq 1 and 2 are offsets 0 and 1.
    expect(offsets[0]?.partitions[0]?.offset).toBe('2');

    const b = source(topic, groupId);
    const gotB: RawInput[] = [];
    await b.start((m) => gotB.push(m));
    await pollUntil('redelivery at source B', async () => (gotB.length >= 3 ? true : undefined), 30_000);
    expect(gotB.map(seqOf)).toEqual([3, 4, 5]);
    for (const m of gotB) m.ack();
    await new Promise((r) => setTimeout(r, 300));
    await b.stop();
    const after = await admin.fetchOffsets({ groupId, topics: [topic] });
    expect(after[0]?.partitions[0]?.offset).toBe('5');
    await admin.deleteTopics({ topics: [topic] });
    await admin.disconnect();
  });
});
