// End to end over Mosquitto: a few simulated hours of the fictional demo reef published at QoS 1 to the
// real broker, through the real `reefd run` (a child process), into VictoriaMetrics (api v2), Kafka and the
// NDJSON output; the raw archive that run wrote replayed with `reefd replay` gives the same records line
// for line; the bad-input table lands in the dead-letter output and the daemon keeps going after it.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { Kafka, logLevel } from 'kafkajs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { KAFKA_BROKERS, MQTT_URL, VM_URL, itTopic, pollUntil, requireService } from '../integration/env.js';
import { connectPublisher, publishAll, wire, withPrefix } from './helpers/mqtt.js';
import { compareWithVictoria, consumeKafka, readNdjson, readNdjsonLines } from './helpers/outputs.js';
import { runReplay, startReefd, type RunningReefd } from './helpers/reefd.js';
import { makeScenario, type Scenario } from './helpers/scenario.js';

interface BadRow {
  why: string;
  topic: string;
  payload: string;
  code: string;
  path?: string;
}
const bad = JSON.parse(
  readFileSync(new URL('../fixtures/messages/bad.json', import.meta.url), 'utf8'),
) as BadRow[];

let sc: Scenario;
const badTopic = (b: BadRow) => withPrefix(b.topic, sc.prefix, sc.site);
let daemon: RunningReefd | undefined;
let kafkaTopic: string;
let live: DerivedRecord[];
let liveLines: string[];
let exitCode: number | null;
let sentGood: number;
let sentBad: BadRow[];

beforeAll(async () => {
  await requireService('Mosquitto', MQTT_URL);
  await requireService('VictoriaMetrics', VM_URL);
  await requireService('Kafka', KAFKA_BROKERS[0] ?? '');
  kafkaTopic = itTopic();
  const admin = new Kafka({
    clientId: 'reefd-e2e',
    brokers: [...KAFKA_BROKERS],
    logLevel: logLevel.NOTHING,
  }).admin();
  await admin.connect();
  await admin.createTopics({ topics: [{ topic: kafkaTopic, numPartitions: 1 }], waitForLeaders: true });
  await admin.disconnect();

  sc = makeScenario('mqtt', ({ id, dataDir }) => ({
    sources: { mqtt: { url: MQTT_URL, client_id: `reefd-e2e-${id}` } },
    outputs: {
      ndjson: { path: path.join(dataDir, 'outputs.ndjson') },
      influx: { url: VM_URL, api: 'v2', bucket: `reefd_e2e_${id}`, flush_ms: 200 },
      kafka: { brokers: [...KAFKA_BROKERS], topic: kafkaTopic },
    },
  }));
  daemon = await startReefd(sc.configFile);
  await pollUntil(
    'daemon ready',
    async () => ((await fetch(`${daemon?.url}/readyz`)).ok ? true : undefined),
    30_000,
  );

  // Good messages, the bad-input table in the middle, then the rest of the good messages.
  const good = wire(sc.messages, sc.prefix);
  const half = Math.floor(good.length / 2);
  // The source subscribes to `<prefix>/<site>/#`: the table's rows go to their topic under this run's
  // prefix and site; the wrong-prefix row cannot reach the daemon at all, so it is left out.
  sentBad = bad.filter((b) => b.code !== 'bad_topic:prefix');
  const badWire = sentBad.map((b) => ({ topic: badTopic(b), payload: b.payload }));
  const pub = await connectPublisher(MQTT_URL, `reefd-e2e-pub-${sc.id}`);
  await publishAll(pub, good.slice(0, half));
  await publishAll(pub, badWire, 1);
  await publishAll(pub, good.slice(half));
  await pub.endAsync();
  sentGood = good.length;
  const total = sentGood + sentBad.length;
  let seen = 0;
  await pollUntil(
    `${total} messages through the daemon`,
    async () => {
      seen = (await daemon?.counter('reefd_messages_in_total')) ?? 0;
      return seen >= total ? true : undefined;
    },
    60_000,
    200,
  ).catch((err: Error) => {
    throw new Error(`${err.message}; counted ${seen}`);
  });
  exitCode = await daemon.stop();
  live = readNdjson(path.join(sc.dataDir, 'outputs.ndjson'));
  liveLines = readNdjsonLines(path.join(sc.dataDir, 'outputs.ndjson'));
}, 180_000);

afterAll(async () => {
  await daemon?.stop();
});

describe('reefd run over Mosquitto (real services)', () => {
  it('takes every message, rejects only the bad ones, and stops cleanly on SIGTERM', () => {
    expect(exitCode).toBe(0);
    const stopped = daemon?.logs.find((l) => l.msg === 'stopped') as
      { stats: { received: number; accepted: number; rejected: number } } | undefined;
    // Every good simulator message accepted, every bad row rejected (nothing lost, nothing extra).
    expect(stopped?.stats.received).toBe(sentGood + sentBad.length);
    expect(stopped?.stats.accepted).toBe(sentGood);
    expect(stopped?.stats.rejected).toBe(sentBad.length);
  });

  it('derives every record type of the demo site (4 simulated hours)', () => {
    const types = new Set(live.map((r) => r.type));
    for (const t of ['waves', 'current', 'carbonate', 'oxygen', 'flux']) expect(types).toContain(t);
    // Oxygen: one record per optode message; the simulator sends 4 optodes every 5 min (libs/simulator CADENCE_S).
    expect(live.filter((r) => r.type === 'oxygen').length).toBeGreaterThan(4 * 40);
    for (const r of live) expect(r.site).toBe(sc.site);
  });

  it('writes every numeric field of every record to VictoriaMetrics with the site, station/transect, sensor and rule labels', async () => {
    const r = await pollUntil(
      'all points in VictoriaMetrics',
      async () => {
        const c = await compareWithVictoria(VM_URL, sc.site, live);
        return c.mismatches.length === 0 ? c : undefined;
      },
      30_000,
      500,
    ).catch(async () => compareWithVictoria(VM_URL, sc.site, live));
    expect(r.mismatches.slice(0, 5)).toEqual([]);
    expect(r.checked).toBeGreaterThan(live.length * 3);
    // No label beyond site, station/transect, sensor and rule (matched per series above).
    expect(r.extraLabels).toEqual([]);
  });

  it('sends the same records to the Kafka derived topic, keyed by site/station or site/transect', async () => {
    const got = await consumeKafka(KAFKA_BROKERS, kafkaTopic, live.length);
    expect(got.length).toBe(live.length);
    // One partition: the topic holds the records in the order the daemon derived them.
    expect(got.map((m) => m.value)).toEqual(liveLines);
    for (const [i, m] of got.entries()) {
      const r = live[i] as DerivedRecord & { station?: string; transect?: string };
      expect(m.key).toBe(`${r.site}/${r.type === 'flux' ? r.transect : r.station}`);
    }
  });

  it('replays its own raw archive into the same NDJSON, line for line', async () => {
    const out = path.join(sc.dir, 'replay.ndjson');
    const r = await runReplay(sc.configFile, path.join(sc.dataDir, 'archive'), out, ['--quiet']);
    expect(r.code, r.stderr).toBe(0);
    const replayed = readNdjsonLines(out);
    expect(replayed.length).toBe(liveLines.length);
    const firstDiff = replayed.findIndex((l, i) => l !== liveLines[i]);
    expect(
      firstDiff === -1 ? null : { i: firstDiff, live: liveLines[firstDiff], replay: replayed[firstDiff] },
    ).toBeNull();
  });

  it('puts each bad input in the dead-letter output with its reason, and keeps processing after it', () => {
    const letters = readNdjson<{ topic: string; rx: string; reason: string; payload: string }>(
      path.join(sc.dataDir, 'dead-letter.ndjson'),
    );
    expect(letters.length).toBe(sentBad.length);
    for (const [i, b] of sentBad.entries()) {
      const l = letters[i];
      expect(l?.topic).toBe(badTopic(b));
      expect(l?.payload).toBe(b.payload);
      // The reason starts with the table's code (contract section 1: rejected with a reason).
      expect(l?.reason.split(':')[0], b.why).toBe(b.code.split(':')[0]);
      if (b.code.includes(':')) expect(l?.reason, b.why).toContain(b.code);
    }
    // Records derived from messages published after the bad rows (the second half of the good messages):
    // nearly one oxygen record per optode message of that half (the simulator's scripted faults drop a few).
    const second = sc.messages.slice(Math.floor(sc.messages.length / 2));
    const firstAfterMs = Math.min(...second.map((m) => Date.parse(String(m.payload.t))));
    const optodeAfter = second.filter((m) => m.topic.split('/')[3] === 'oxygen').length;
    const oxygenAfter = live.filter((r) => r.type === 'oxygen' && Date.parse(r.t) >= firstAfterMs).length;
    expect(optodeAfter).toBeGreaterThan(50);
    expect(oxygenAfter).toBeGreaterThanOrEqual(Math.floor(0.9 * optodeAfter));
  });
});
