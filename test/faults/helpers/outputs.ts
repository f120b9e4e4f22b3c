// Counting what reached the record outputs, every copy kept: the NDJSON file line by line, the Kafka topic
// message by message (from the start, all partitions). A record's identity is its type, station (or
// transect), sensor, rule and time, so a copy of a record is a duplicate wherever it comes from.
import { readFile } from 'node:fs/promises';
import { Kafka, logLevel } from 'kafkajs';
import { sleep } from './count.js';

export interface OutputCount {
  /** identity -> copies. */
  byId: Map<string, number>;
  records: number;
  duplicates: number;
  /** Times (ms) of the oxygen records present (at least once). */
  oxygenTs: Set<number>;
}

interface Rec {
  type?: string;
  t?: string;
  station?: string;
  transect?: string;
  sensor?: string;
  rule?: string;
  state?: string;
}

export function identity(r: Rec): string {
  return [r.type, r.station ?? r.transect ?? '', r.sensor ?? '', r.rule ?? '', r.state ?? '', r.t].join('|');
}

function countOf(recs: Iterable<Rec>): OutputCount {
  const c: OutputCount = { byId: new Map(), records: 0, duplicates: 0, oxygenTs: new Set() };
  for (const r of recs) {
    c.records++;
    const id = identity(r);
    const prev = c.byId.get(id) ?? 0;
    if (prev > 0) c.duplicates++;
    c.byId.set(id, prev + 1);
    if (r.type === 'oxygen' && r.t !== undefined) c.oxygenTs.add(Date.parse(r.t));
  }
  return c;
}

/** Every line of an NDJSON output (a torn last line would be a defect: it fails the parse). */
export async function countNdjson(file: string): Promise<OutputCount> {
  const text = await readFile(file, 'utf8').catch(() => '');
  const lines = text.split('\n');
  if (lines.at(-1) === '') lines.pop();
  return countOf(lines.map((l) => JSON.parse(l) as Rec));
}

/** Creates a topic (one partition unless told) on a broker. */
export async function createTopic(broker: string, topic: string, partitions = 1): Promise<void> {
  const admin = new Kafka({
    clientId: 'faults-admin',
    brokers: [broker],
    logLevel: logLevel.NOTHING,
  }).admin();
  await admin.connect();
  await admin.createTopics({ topics: [{ topic, numPartitions: partitions }], waitForLeaders: true });
  await admin.disconnect();
}

/**
 * Every message of a topic from the start, read until the end offsets taken first are reached (so a
 * message written later is not waited for); each value is a record.
 */
export async function countKafka(broker: string, topic: string, timeoutMs = 60_000): Promise<OutputCount> {
  const client = new Kafka({
    clientId: `faults-count-${Date.now()}`,
    brokers: [broker],
    logLevel: logLevel.NOTHING,
    retry: { retries: 10, initialRetryTime: 200 },
  });
  const admin = client.admin();
  await admin.connect();
  const ends = await admin.fetchTopicOffsets(topic);
  await admin.disconnect();
  const want = new Map(
    ends.filter((e) => Number(e.high) > Number(e.low)).map((e) => [e.partition, Number(e.high) - 1]),
  );
  const recs: Rec[] = [];
  if (want.size === 0) return countOf(recs);
  const consumer = client.consumer({
    groupId: `faults-count-${Date.now()}-${Math.random()}`,
    maxWaitTimeInMs: 200,
  });
  await consumer.connect();
  await consumer.subscribe({ topic, fromBeginning: true });
  const done = new Set<number>();
  await consumer.run({
    autoCommit: false,
    eachMessage: async ({ partition, message }) => {
      const last = want.get(partition);
      if (last === undefined || Number(message.offset) > last) return;
      recs.push(JSON.parse(message.value?.toString() ?? '{}') as Rec);
      if (Number(message.offset) === last) done.add(partition);
    },
  });
  const end = Date.now() + timeoutMs;
  while (done.size < want.size && Date.now() < end) await sleep(100);
  await consumer.disconnect();
  if (done.size < want.size)
    throw new Error(`reading ${topic} back did not reach its end in ${timeoutMs} ms`);
  return countOf(recs);
}

/** Lost and duplicated, per output, for the case's summary line and its assertions. */
export function verdict(
  expectedOxygenTs: readonly number[],
  c: OutputCount,
): { lost: number; duplicated: number } {
  return { lost: expectedOxygenTs.filter((t) => !c.oxygenTs.has(t)).length, duplicated: c.duplicates };
}
