// End to end over Kafka: the same simulated hours of the demo reef produced to a Kafka topic with the
// contract's key (`<site>/<station>/<sensor>`) and value (payload plus site, station, kind, sensor), read by
// the real `reefd run` through sources.kafka, written to InfluxDB 1.x (api v1) and the NDJSON output; the
// archive this run wrote replays into the same NDJSON.
import path from 'node:path';
import { Kafka, logLevel } from 'kafkajs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DerivedRecord } from '../../libs/contract/index.js';
import { INFLUX1_URL, KAFKA_BROKERS, itTopic, pollUntil, requireService } from '../integration/env.js';
import { influxQuery } from '../integration/io/influx-http.js';
import { compareWithInflux1, readNdjson, readNdjsonLines } from './helpers/outputs.js';
import { runReplay, startReefd, type RunningReefd } from './helpers/reefd.js';
import { makeScenario, type Scenario } from './helpers/scenario.js';

let sc: Scenario;
let daemon: RunningReefd | undefined;
let db: string;
let live: DerivedRecord[];
let liveLines: string[];
let exitCode: number | null;

beforeAll(async () => {
  await requireService('Kafka', KAFKA_BROKERS[0] ?? '');
  await requireService('InfluxDB 1.x', INFLUX1_URL);
  const topic = itTopic();
  const kafka = new Kafka({ clientId: 'reefd-e2e', brokers: [...KAFKA_BROKERS], logLevel: logLevel.NOTHING });
  const admin = kafka.admin();
  await admin.connect();
  await admin.createTopics({ topics: [{ topic, numPartitions: 1 }], waitForLeaders: true });
  await admin.disconnect();

  sc = makeScenario('kafka', ({ id, dataDir }) => {
    db = `reefd_e2e_${id}`;
    return {
      sources: { kafka: { brokers: [...KAFKA_BROKERS], topic, group_id: `reefd-e2e-${id}` } },
      outputs: {
        ndjson: { path: path.join(dataDir, 'outputs.ndjson') },
        influx: { url: INFLUX1_URL, api: 'v1', db, flush_ms: 200 },
      },
    };
  });
  await influxQuery(INFLUX1_URL, undefined, `CREATE DATABASE ${db}`);

  const producer = kafka.producer({ idempotent: true, maxInFlightRequests: 1 });
  await producer.connect();
  const messages = sc.messages.map((m) => {
    const [, site, station, kind, sensor] = m.topic.split('/');
    return {
      key: `${site}/${station}/${sensor}`,
      value: JSON.stringify({ ...m.payload, site, station, kind, sensor }),
    };
  });
  for (let i = 0; i < messages.length; i += 200)
    await producer.send({ topic, acks: -1, messages: messages.slice(i, i + 200) });
  await producer.disconnect();

  daemon = await startReefd(sc.configFile);
  let seen = 0;
  await pollUntil(
    `${messages.length} messages through the daemon`,
    async () => {
      seen = (await daemon?.counter('reefd_messages_in_total')) ?? 0;
      return seen >= messages.length ? true : undefined;
    },
    90_000,
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
  if (db !== undefined) await influxQuery(INFLUX1_URL, undefined, `DROP DATABASE ${db}`);
});

describe('reefd run over a Kafka source into InfluxDB 1.x (real services)', () => {
  it('accepts every message from the topic and stops cleanly', () => {
    expect(exitCode).toBe(0);
    const stopped = daemon?.logs.find((l) => l.msg === 'stopped') as
      { stats: { received: number; accepted: number; rejected: number } } | undefined;
    expect(stopped?.stats.received).toBe(sc.messages.length);
    expect(stopped?.stats.accepted).toBe(sc.messages.length);
    const types = new Set(live.map((r) => r.type));
    for (const t of ['waves', 'current', 'carbonate', 'oxygen', 'flux']) expect(types).toContain(t);
  });

  it('writes every record to InfluxDB 1.x: measurement = type, tags site and station/transect, the numeric fields', async () => {
    const r = await pollUntil(
      'all points in InfluxDB 1.x',
      async () => {
        const c = await compareWithInflux1(INFLUX1_URL, db, live);
        return c.mismatches.length === 0 ? c : undefined;
      },
      30_000,
      500,
    ).catch(async () => compareWithInflux1(INFLUX1_URL, db, live));
    expect(r.mismatches.slice(0, 5)).toEqual([]);
    expect(r.checked).toBeGreaterThan(live.length * 3);
    // Tags per docs/contract-v1.md: site plus station and sensor, or site plus transect for fluxes.
    expect(r.tagKeys.flux).toEqual(['site', 'transect']);
    // Station records also carry their sensor (two optodes at one station never overwrite each other).
    expect(r.tagKeys.oxygen).toEqual(['sensor', 'site', 'station']);
    expect(r.tagKeys.waves).toEqual(['sensor', 'site', 'station']);
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
});
