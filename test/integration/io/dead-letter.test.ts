// The dead-letter output to a real MQTT topic and a real Kafka topic, rate limit included.
import { describe, it, expect, beforeAll } from 'vitest';
import mqtt from 'mqtt';
import { Kafka, logLevel } from 'kafkajs';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createDeadLetterSink, kafkaPublisher, mqttPublisher } from '../../../services/sinks/dead-letter.js';
import { KAFKA_BROKERS, MQTT_URL, itTopic, pollUntil, randomSuffix, requireService } from '../env.js';
import { quietLogger } from './fixtures.js';

beforeAll(async () => {
  await requireService('Mosquitto', MQTT_URL);
  await requireService('Kafka', KAFKA_BROKERS[0] ?? '');
});

describe('dead-letter output (Mosquitto, Kafka)', () => {
  it('publishes letters and the suppression summary to MQTT and Kafka, and writes them to the file', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'reefd-dl-it-'));
    const mqttTopic = `reefd-it-${randomSuffix()}/dead`;
    const kafkaTopic = itTopic();
    const kafka = new Kafka({
      clientId: 'reefd-it',
      brokers: [...KAFKA_BROKERS],
      logLevel: logLevel.NOTHING,
    });
    const admin = kafka.admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic: kafkaTopic, numPartitions: 1 }], waitForLeaders: true });
    const producer = kafka.producer();
    await producer.connect();

    const sub = await mqtt.connectAsync(MQTT_URL, {
      protocolVersion: 5,
      clientId: `reefd-it-${randomSuffix()}`,
    });
    const got: string[] = [];
    sub.on('message', (_t, p) => got.push(p.toString()));
    await sub.subscribeAsync(mqttTopic, { qos: 1 });
    const pub = await mqtt.connectAsync(MQTT_URL, {
      protocolVersion: 5,
      clientId: `reefd-it-${randomSuffix()}`,
    });

    const dl = await createDeadLetterSink({
      path: join(dir, 'dead.ndjson'),
      mqtt: { publisher: mqttPublisher(pub), topic: mqttTopic },
      kafka: { publisher: kafkaPublisher(producer), topic: kafkaTopic },
      maxPerMin: 3,
      clock: () => 0,
      logger: quietLogger(),
      summaryEveryMs: 0,
    });
    for (let i = 0; i < 8; i++) {
      dl.write({ topic: 'reef/s/st/ctd/c1', rxMs: i, reason: 'missing:sal', payload: `{"v":1,"i":${i}}` });
    }
    await dl.close();
    expect(dl.suppressed()).toBe(5);
    await pollUntil('4 dead letters on MQTT', async () => (got.length >= 4 ? true : undefined), 10_000);
    expect(got.slice(0, 3).map((l) => (JSON.parse(l) as { payload: string }).payload)).toEqual([
      '{"v":1,"i":0}',
      '{"v":1,"i":1}',
      '{"v":1,"i":2}',
    ]);
    expect(JSON.parse(got[3] ?? '')).toMatchObject({ summary: '5 suppressed', suppressed: 5 });
    const offsets = await admin.fetchTopicOffsets(kafkaTopic);
    expect(offsets[0]?.high).toBe('4');
    const file = (await readFile(join(dir, 'dead.ndjson'), 'utf8')).trim().split('\n');
    expect(file.length).toBe(4);

    await sub.endAsync();
    await pub.endAsync();
    await producer.disconnect();
    await admin.deleteTopics({ topics: [kafkaTopic] });
    await admin.disconnect();
    await rm(dir, { recursive: true, force: true });
  });
});
