// The Kafka sink against the real broker, through the shared sink contract: a log destination keyed by
// site/station, so order is per series (one partition per key).
import { beforeAll, afterAll, describe, it, expect } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Kafka, logLevel, type Consumer } from 'kafkajs';
import { createKafkaSink } from '../../../services/sinks/kafka-sink.js';
import { KAFKA_BROKERS, pollUntil, requireService } from '../env.js';
import {
  runSinkContract,
  readBackItem,
  contractRecords,
  type ContractContext,
  type ReadBackItem,
} from '../sink-contract.js';
import { quietLogger } from './fixtures.js';

const root = mkdtempSync(join(tmpdir(), 'reefd-kafka-sink-'));
const kafka = new Kafka({ clientId: 'reefd-it', brokers: [...KAFKA_BROKERS], logLevel: logLevel.NOTHING });
const admin = kafka.admin();
const topicOf = (ctx: ContractContext): string => `reefd-it-${ctx.id}`;

interface Collected {
  consumer: Consumer;
  messages: { key: string; value: Record<string, unknown> }[];
}
const collectors = new Map<string, Collected>();

beforeAll(async () => {
  await requireService('Kafka', KAFKA_BROKERS[0] ?? '');
  await admin.connect();
});
afterAll(async () => {
  await admin.disconnect();
  await rm(root, { recursive: true, force: true });
});

async function collector(topic: string): Promise<Collected> {
  let c = collectors.get(topic);
  if (c !== undefined) return c;
  const consumer = kafka.consumer({ groupId: `${topic}-reader` });
  c = { consumer, messages: [] };
  collectors.set(topic, c);
  const into = c.messages;
  await consumer.connect();
  await consumer.subscribe({ topics: [topic], fromBeginning: true });
  await consumer.run({
    eachMessage: async ({ message }) => {
      into.push({
        key: message.key?.toString() ?? '',
        value: JSON.parse(message.value?.toString() ?? 'null') as Record<string, unknown>,
      });
    },
  });
  return c;
}

/** Everything on the topic: waits until the collector has read up to the high watermarks. */
async function readTopic(topic: string): Promise<Collected['messages']> {
  const c = await collector(topic);
  const offsets = await admin.fetchTopicOffsets(topic);
  const total = offsets.reduce((n, p) => n + Number(p.high) - Number(p.low), 0);
  await pollUntil(
    `${total} messages collected from ${topic}`,
    async () => (c.messages.length >= total ? true : undefined),
    20_000,
    50,
  );
  return c.messages;
}

function makeSink(ctx: ContractContext) {
  return (async () => {
    await admin.createTopics({ topics: [{ topic: topicOf(ctx), numPartitions: 2 }], waitForLeaders: true });
    return createKafkaSink({
      brokers: KAFKA_BROKERS,
      clientId: 'reefd-it',
      topic: topicOf(ctx),
      batchSize: 64,
      flushMs: 20,
      spoolDir: join(root, ctx.id),
      spoolMaxMb: 16,
      logger: quietLogger(),
    });
  })();
}

runSinkContract(
  'Kafka topic',
  makeSink,
  async (ctx): Promise<ReadBackItem[]> =>
    (await readTopic(topicOf(ctx))).map(({ value: r }) =>
      readBackItem(String(r.station), Date.parse(String(r.t)), Number(r.o2_umol_kg), Number(r.o2_sat_pct)),
    ),
  {
    semantics: 'log',
    cleanup: async (ctx) => {
      const c = collectors.get(topicOf(ctx));
      collectors.delete(topicOf(ctx));
      await c?.consumer.disconnect();
      await admin.deleteTopics({ topics: [topicOf(ctx)] }).catch(() => undefined);
    },
  },
);

describe('Kafka sink keys and values', () => {
  it('keys records by site/station (site/transect for fluxes) with the record JSON as value', async () => {
    const ctx: ContractContext = { id: `keys-${Date.now()}`, site: 'it_keys' };
    const sink = await makeSink(ctx);
    const flux = {
      type: 'flux',
      site: 'it_keys',
      transect: 'flat',
      t: '2026-11-20T01:00:00.000Z',
      ncp_mmol_m2_h: 10,
      nec_mmol_m2_h: 2,
      nec_method: 'ta',
      u_m_s: 0.1,
      depth_m: 1.2,
      residence_min: 58,
      valid: true,
      ncp_significant: true,
      nec_significant: false,
    } as const;
    sink.write([...contractRecords('it_keys', 0, 1), flux]);
    await sink.close();
    const got = await readTopic(topicOf(ctx));
    expect(got.map((m) => m.key).sort()).toEqual(['it_keys/crest', 'it_keys/flat']);
    expect(got.find((m) => m.key === 'it_keys/flat')?.value).toEqual(flux);
    const c = collectors.get(topicOf(ctx));
    await c?.consumer.disconnect();
    await admin.deleteTopics({ topics: [topicOf(ctx)] });
  });
});
