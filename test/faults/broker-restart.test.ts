// Fault (b): the MQTT broker (a private Mosquitto with persistence, never the shared one) restarted
// mid-stream (twice). The publisher and reefd reconnect to their persistent sessions; nothing acknowledged
// is lost, and every output holds every oxygen record exactly once: the database (VictoriaMetrics without
// deduplication), the NDJSON file and the Kafka topic (a private broker), every copy counted.
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { countArchive, countVm, sleep, summary, waitFor } from './helpers/count.js';
import { faultConfig, spawnDaemon, writeConfig } from './helpers/daemon.js';
import { startPrivateKafka } from './helpers/kafka.js';
import { countKafka, countNdjson, createTopic, verdict } from './helpers/outputs.js';
import { startControlledVm, startPrivateMosquitto } from './helpers/procs.js';
import { caseEnv } from './helpers/setup.js';
import { connectPublisher, oxygenSeries } from './helpers/traffic.js';

const env = caseEnv('b');
afterAll(() => env.cleanup());

describe('fault b: Mosquitto restarted mid-stream', () => {
  it('every acknowledged message reaches the archive and every output once', async () => {
    const [mosq, kafka, vm] = await Promise.all([
      startPrivateMosquitto(),
      startPrivateKafka(),
      startControlledVm({ dedup: false }),
    ]);
    env.defer(() => mosq.stop());
    env.defer(() => kafka.stop());
    env.defer(() => vm.stop());
    const { prefix, site, dataDir, archiveDir } = env;
    const topic = `reefd-derived-${env.id}`;
    await createTopic(kafka.broker, topic, 2);
    const ndjson = join(dataDir, 'records.ndjson');
    const cfg = writeConfig(
      faultConfig({
        prefix,
        site,
        dataDir,
        mqttUrl: mosq.url,
        influxUrl: vm.url,
        kafka: { brokers: [kafka.broker], topic },
        ndjsonPath: ndjson,
      }),
    );
    const d = await spawnDaemon(cfg);
    env.defer(() => d.kill('SIGKILL'));
    const pub = await connectPublisher(mosq.url, `pub-${env.id}`);
    env.defer(() => pub.end());
    const msgs = oxygenSeries({ prefix, site, startMs: Date.now() - 3 * 3600_000, n: 3000 });
    const oxygenTs = msgs.filter((m) => m.kind === 'oxygen').map((m) => m.tMs);

    const published = pub.publish(msgs, 200, undefined, 300);
    const restarts: number[] = [];
    for (const at of [3000, 3500]) {
      await sleep(at);
      restarts.push(pub.acked.size);
      await mosq.restart(1000);
    }
    await published;
    await waitFor(async () => {
      const a = await countArchive(archiveDir, prefix);
      return [...pub.acked].every((k) => a.byKey.has(k));
    }, 15_000);
    await waitFor(
      async () => (await countVm(vm.url, 'oxygen_o2_umol_kg', site)).byTs.size >= oxygenTs.length,
      15_000,
      500,
    );
    const stopped = await d.kill('SIGTERM');
    const a = await countArchive(archiveDir, prefix);
    const db = await countVm(vm.url, 'oxygen_o2_umol_kg', site);
    const nd = verdict(oxygenTs, await countNdjson(ndjson));
    const kf = verdict(oxygenTs, await countKafka(kafka.broker, topic));
    const missingArchive = [...pub.acked].filter((k) => !a.byKey.has(k)).length;
    const missingDb = oxygenTs.filter((t) => !db.byTs.has(t)).length;
    summary('b (broker restart)', {
      sent: pub.sent,
      acked: pub.acked.size,
      'restarts after acks': restarts.join(' and '),
      archived: a.byKey.size,
      'archive redelivered copies': a.duplicates,
      'archive conflicts': a.conflicts,
      'missing from archive': missingArchive,
      'oxygen expected': oxygenTs.length,
      'in db': db.byTs.size,
      'db lost': missingDb,
      'db duplicated': db.duplicates,
      'ndjson lost': nd.lost,
      'ndjson duplicated': nd.duplicated,
      'kafka lost': kf.lost,
      'kafka duplicated': kf.duplicated,
    });
    expect(stopped.code).toBe(0);
    expect(pub.acked.size).toBe(msgs.length);
    expect(missingArchive).toBe(0);
    // KNOWN LIMIT (reported): a message whose PUBACK was held for the archive fsync when the broker went
    // away is redelivered by the broker and archived a second time (QoS 1 is at-least-once). The copy is
    // byte-identical; the processor's duplicate detection drops it, so the database holds it once.
    expect(a.conflicts).toBe(0);
    expect(a.byKey.size).toBe(msgs.length);
    expect(missingDb).toBe(0);
    expect(db.duplicates).toBe(0);
    expect(nd).toEqual({ lost: 0, duplicated: 0 });
    expect(kf).toEqual({ lost: 0, duplicated: 0 });
  });
});
