// Edge mode end to end in the daemon: `bridge` in the configuration, MQTT in (real Mosquitto), the raw
// archive as usual, every accepted message on the Kafka raw topic with the contract's key and value, all
// of a site on one partition, the edge receive time as the Kafka timestamp, and no derived records.
import { mkdtemp, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { Kafka, logLevel, type KafkaMessage } from 'kafkajs';
import mqtt from 'mqtt';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText } from '../../../libs/contract/index.js';
import { simulateMessages } from '../../../libs/simulator/index.js';
import { startDaemon } from '../../../services/daemon/daemon.js';
import { KAFKA_BROKERS, MQTT_URL, itTopic, pollUntil, randomSuffix, requireService } from '../env.js';
import { quietLogger } from '../io/fixtures.js';

const DEMO = path.resolve(import.meta.dirname, '../../../deploy/demo/ornen-reef.yaml');
const kafka = new Kafka({ clientId: 'reefd-it', brokers: [...KAFKA_BROKERS], logLevel: logLevel.NOTHING });

beforeAll(async () => {
  await requireService('Kafka', KAFKA_BROKERS[0] ?? '');
  await requireService('Mosquitto', MQTT_URL);
});

describe('edge mode (bridge) in the daemon', () => {
  it('archives, forwards accepted messages with the contract key by site, derives nothing', async () => {
    const id = randomSuffix();
    const topic = itTopic();
    const prefix = `it-${id}`;
    const dataDir = await mkdtemp(path.join(tmpdir(), 'reefd-edge-daemon-'));
    const admin = kafka.admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic, numPartitions: 3 }], waitForLeaders: true });

    const text = (await readFile(DEMO, 'utf8')).replace(/^topic_prefix: .*$/m, `topic_prefix: ${prefix}`);
    const extra = [
      `sources: { mqtt: { url: "${MQTT_URL}", client_id: edge-${id} } }`,
      `bridge: { kafka: { brokers: [${KAFKA_BROKERS.join(', ')}], topic: ${topic} } }`,
      `data_dir: ${dataDir}`,
    ].join('\n');
    const parsed = parseConfigText(`${text}\n${extra}\n`);
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    const config = parsed.config;
    const daemon = await startDaemon({ config, baseDir: dataDir, logger: quietLogger(), env: {} });

    // One simulated hour, ending two hours ago (timing QC: sample times before the wall clock).
    const startMs = Date.now() - 3 * 3600_000;
    const sim = simulateMessages(config, { startMs, durationMs: 3600_000, seed: 5 }).messages;
    const client = await mqtt.connectAsync(MQTT_URL, { clientId: `pub-${id}`, protocolVersion: 5 });
    const t0 = Date.now();
    for (const m of sim)
      await client.publishAsync(m.topic.replace(/^reef\//, `${prefix}/`), JSON.stringify(m.payload), {
        qos: 1,
      });
    // One message the configuration does not know: archived as rejected, never forwarded.
    await client.publishAsync(
      `${prefix}/ornen-reef/crest/ctd/ctd-nowhere`,
      JSON.stringify({ v: 1, t: new Date(startMs).toISOString(), temp_c: 27, sal: 35 }),
      { qos: 1 },
    );
    await client.endAsync();
    await pollUntil(
      'every message through the pipeline',
      async () => (daemon.pipeline.stats().received >= sim.length + 1 ? true : undefined),
      30_000,
    );
    await daemon.stop('test');
    const t1 = Date.now();
    const stats = daemon.pipeline.stats();
    expect(stats.accepted).toBe(sim.length);
    expect(stats.rejectsByReason).toEqual({ unknown_sensor: 1 });
    expect(stats.recordsByType).toEqual({});

    // Read the raw topic back.
    const got: { partition: number; m: KafkaMessage }[] = [];
    const consumer = kafka.consumer({ groupId: `reefd-it-${id}` });
    await consumer.connect();
    await consumer.subscribe({ topics: [topic], fromBeginning: true });
    await consumer.run({
      eachMessage: async ({ partition, message }) => {
        got.push({ partition, m: message });
      },
    });
    await pollUntil(
      'the raw topic read back',
      async () => (got.length >= sim.length ? true : undefined),
      30_000,
    );
    await consumer.disconnect();
    await admin.deleteTopics({ topics: [topic] }).catch(() => undefined);
    await admin.disconnect();

    // Exactly the accepted messages, in publish order, on one partition (the site's).
    expect(got.length).toBe(sim.length);
    expect(new Set(got.map((g) => g.partition)).size).toBe(1);
    got.forEach(({ m }, i) => {
      const s = sim[i];
      if (s === undefined) throw new Error('more records than messages');
      const [, site, station, kind, sensor] = s.topic.split('/');
      // docs/contract-v1.md section 1: key `<site>/<station>/<sensor>`, value = payload + the four ids.
      expect(m.key?.toString()).toBe(`${site}/${station}/${sensor}`);
      const value = JSON.parse(m.value?.toString() ?? '') as Record<string, unknown>;
      expect(value).toMatchObject({ site, station, kind, sensor, t: s.payload.t, v: 1 });
      expect(Object.keys(value).sort()).toEqual(
        [...new Set([...Object.keys(s.payload), 'site', 'station', 'kind', 'sensor'])].sort(),
      );
      // The Kafka timestamp is the edge's receive time.
      const ts = Number(m.timestamp);
      expect(ts >= t0 - 1000 && ts <= t1).toBe(true);
    });

    // The archive holds every message, the rejected one marked.
    const lines = (await readFile(path.join(dataDir, 'archive', await firstArchive(dataDir)), 'utf8'))
      .trim()
      .split('\n');
    expect(lines.length).toBe(sim.length + 1);
    expect(lines.filter((l) => l.includes('"reject"')).length).toBe(1);
  }, 90_000);
});

async function firstArchive(dataDir: string): Promise<string> {
  const { readdir } = await import('node:fs/promises');
  const files = (await readdir(path.join(dataDir, 'archive'))).filter((f) => f.startsWith('raw-'));
  if (files[0] === undefined) throw new Error('no archive file');
  return files[0];
}
