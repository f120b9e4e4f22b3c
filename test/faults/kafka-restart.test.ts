// Fault (d): the Kafka broker restarted mid-stream (a private single-node KRaft broker from the project's
// Kafka jars, never the shared one). Every oxygen record reaches the derived topic; copies are counted.
import { Kafka, logLevel } from 'kafkajs';
import { afterAll, describe, expect, it } from 'vitest';
import { countArchive, sleep, summary, waitFor } from './helpers/count.js';
import { faultConfig, spawnDaemon, writeConfig } from './helpers/daemon.js';
import { startPrivateKafka } from './helpers/kafka.js';
import { startPrivateMosquitto } from './helpers/procs.js';
import { caseEnv } from './helpers/setup.js';
import { connectPublisher, oxygenSeries } from './helpers/traffic.js';

const env = caseEnv('d');
afterAll(() => env.cleanup());

describe('fault d: Kafka broker restarted mid-stream', () => {
  it('every oxygen record reaches the derived topic, in order, without loss', async () => {
    const [mosq, kafka] = await Promise.all([startPrivateMosquitto(), startPrivateKafka()]);
    env.defer(() => mosq.stop());
    env.defer(() => kafka.stop());
    const { prefix, site, dataDir, archiveDir } = env;
    const topic = `reefd-derived-${env.id}`;
    const client = new Kafka({
      clientId: `faults-${env.id}`,
      brokers: [kafka.broker],
      logLevel: logLevel.NOTHING,
      retry: { retries: 20, initialRetryTime: 200 },
    });
    const admin = client.admin();
    await admin.connect();
    await admin.createTopics({ topics: [{ topic, numPartitions: 1 }], waitForLeaders: true });
    await admin.disconnect();
    const cfg = writeConfig(
      faultConfig({ prefix, site, dataDir, mqttUrl: mosq.url, kafka: { brokers: [kafka.broker], topic } }),
    );
    const d = await spawnDaemon(cfg);
    env.defer(() => d.kill('SIGKILL'));
    const pub = await connectPublisher(mosq.url, `pub-${env.id}`);
    env.defer(() => pub.end());
    const msgs = oxygenSeries({ prefix, site, startMs: Date.now() - 3 * 3600_000, n: 1500 });
    const oxygenTs = msgs.filter((m) => m.kind === 'oxygen').map((m) => new Date(m.tMs).toISOString());

    const published = pub.publish(msgs, 100, undefined, 150);
    await sleep(3000);
    const restartAt = pub.acked.size;
    const t0 = Date.now();
    await kafka.restart(1000);
    const restartMs = Date.now() - t0;
    await published;

    // Read the derived topic from the start.
    const consumer = client.consumer({ groupId: `faults-${env.id}` });
    env.defer(() => consumer.disconnect());
    const seen: string[] = [];
    await consumer.connect();
    await consumer.subscribe({ topic, fromBeginning: true });
    await consumer.run({
      eachMessage: async ({ message }) => {
        const r = JSON.parse(message.value?.toString() ?? '{}') as { type?: string; t?: string };
        if (r.type === 'oxygen' && r.t !== undefined) seen.push(r.t);
      },
    });
    await waitFor(async () => new Set(seen).size >= oxygenTs.length, 40_000, 500);
    await sleep(1000);
    const stopped = await d.kill('SIGTERM');
    const a = await countArchive(archiveDir, prefix);
    const distinct = new Set(seen);
    const missing = oxygenTs.filter((t) => !distinct.has(t)).length;
    let inOrder = true;
    for (let i = 1; i < seen.length; i++) if ((seen[i] as string) < (seen[i - 1] as string)) inOrder = false;
    summary('d (Kafka broker restart)', {
      sent: pub.sent,
      acked: pub.acked.size,
      'restart after acks': restartAt,
      'broker down s': (restartMs / 1000).toFixed(1),
      archived: a.byKey.size,
      'oxygen expected': oxygenTs.length,
      'on topic': distinct.size,
      'topic copies': seen.length - distinct.size,
      missing,
      'in order': inOrder ? 'yes' : 'no',
    });
    expect(stopped.code).toBe(0);
    expect(pub.acked.size).toBe(msgs.length);
    expect(a.byKey.size).toBe(msgs.length);
    expect(missing).toBe(0);
    expect(seen.length - distinct.size).toBe(0);
    expect(inOrder).toBe(true);
  });
});
