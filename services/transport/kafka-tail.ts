// Reads the end of each partition of a topic back and finds the highest stream position (`reefd-pos`
// header) of one epoch there: what the Kafka output already holds (services/sinks/kafka-sink.ts). The last `scan`
// messages of each partition are read with a consumer of a throwaway group (kafkajs has no group-less
// reader), which is deleted afterwards.
import { randomBytes } from 'node:crypto';
import type { Kafka } from 'kafkajs';

export interface PartitionTails {
  partitions: number;
  /** partition -> highest position of the epoch found in the part read. */
  hwm: Map<number, number>;
}

const header = (h: Record<string, unknown> | undefined, name: string): string | undefined => {
  const v = h?.[name];
  if (v === undefined || v === null) return undefined;
  return Buffer.isBuffer(v) ? v.toString('utf8') : String(v as string);
};

export async function readPartitionTails(
  client: Kafka,
  topic: string,
  epoch: string,
  scan: number,
  timeoutMs = 60_000,
): Promise<PartitionTails> {
  const admin = client.admin();
  await admin.connect();
  try {
    const offsets = await admin.fetchTopicOffsets(topic);
    const out: PartitionTails = { partitions: offsets.length, hwm: new Map() };
    const want = offsets
      .map((o) => ({ partition: o.partition, low: BigInt(o.low), high: BigInt(o.high) }))
      .filter((o) => o.high > o.low)
      .map((o) => {
        const from = o.high - BigInt(scan) > o.low ? o.high - BigInt(scan) : o.low;
        return { partition: o.partition, from, last: o.high - 1n };
      });
    if (want.length === 0) return out;
    const groupId = `reefd-tail-${randomBytes(6).toString('hex')}`;
    const consumer = client.consumer({ groupId, maxWaitTimeInMs: 250, allowAutoTopicCreation: false });
    await consumer.connect();
    try {
      await consumer.subscribe({ topic, fromBeginning: true });
      const done = new Set<number>();
      const last = new Map(want.map((w) => [w.partition, w.last]));
      let finish: () => void = () => undefined;
      const finished = new Promise<void>((r) => (finish = r));
      await consumer.run({
        autoCommit: false,
        eachBatch: async ({ batch }) => {
          const end = last.get(batch.partition);
          if (end === undefined) return;
          for (const m of batch.messages) {
            if (header(m.headers as Record<string, unknown>, 'reefd-epoch') === epoch) {
              const pos = Number(header(m.headers as Record<string, unknown>, 'reefd-pos'));
              if (Number.isSafeInteger(pos) && pos > (out.hwm.get(batch.partition) ?? -1))
                out.hwm.set(batch.partition, pos);
            }
          }
          // Compacted topics may have no message at the last offset: the batch's end counts.
          if (BigInt(batch.lastOffset()) >= end) done.add(batch.partition);
          if (done.size === want.length) finish();
        },
      });
      for (const w of want) consumer.seek({ topic, partition: w.partition, offset: w.from.toString() });
      let timer: NodeJS.Timeout | undefined;
      const timedOut = new Promise<never>((_, reject) => {
        timer = setTimeout(
          () => reject(new Error(`reading the end of ${topic} back took over ${timeoutMs} ms`)),
          timeoutMs,
        );
      });
      try {
        await Promise.race([finished, timedOut]);
      } finally {
        clearTimeout(timer);
      }
    } finally {
      await consumer.disconnect().catch(() => undefined);
      await admin.deleteGroups([groupId]).catch(() => undefined);
    }
    return out;
  } finally {
    await admin.disconnect().catch(() => undefined);
  }
}
