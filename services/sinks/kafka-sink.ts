// Derived records to a Kafka topic: key `<site>/<station>` (or `<site>/<transect>` for fluxes), value the
// record's JSON. The producer is idempotent with acks = -1 (all in-sync replicas) and one request in flight,
// so kafkajs' own retries neither duplicate nor reorder within a partition. Outages longer than those
// retries go to the disk spool (spooled-sink.ts) and are replayed in order.
//
// Exactly once across crashes (records with stream positions, as the daemon writes them): every message
// carries headers `reefd-epoch`, `reefd-pos` (its stream position) and `reefd-key` (the record's identity).
// Before its first send, and again after a send whose fate is unknown, the sink reads the end of each
// partition back (transport/kafka-tail.ts) and learns the highest position of its stream each one holds; a record
// at or below that position in its partition is not sent again. A delivery ledger beside the spool
// (delivery-ledger.ts) keeps the same marks as a lower bound, for a partition whose end other producers
// have pushed beyond the part read back.
// A replay (`reefd replay` loaded into Kafka) does duplicate messages on the topic (Kafka is a log); a
// consumer that keeps the last value per `reefd-key` sees the same state, the database's overwrite rule.
import { recordKey, ReefdError, type DerivedRecord } from '../../libs/contract/index.js';
import type { Logger } from '../log/logger.js';
import type { Sleep } from '../transport/backoff.js';
import {
  kafkaRetriable,
  openKafka,
  type KafkaAdmin,
  type KafkaOutMessage,
  type KafkaSasl,
  type OrderedProducerOptions,
  type ReefdKafka,
} from '../transport/kafka-client.js';
import type { PartitionTails } from '../transport/kafka-tail.js';
import type { TlsFiles } from '../transport/tls.js';
import { DeliveryLedger, splitPosition, withPosition } from './delivery-ledger.js';
import { createSpooledSink, type SpooledSink } from './spooled-sink.js';

export interface KafkaSinkOptions {
  name?: string;
  brokers: readonly string[];
  clientId: string;
  topic: string;
  tls?: TlsFiles | undefined;
  /** SASL with the password resolved by the caller. */
  sasl?: KafkaSasl;
  batchSize?: number;
  flushMs?: number;
  spoolDir: string;
  spoolMaxMb: number;
  logger: Logger;
  backoff?: { baseMs: number; maxMs: number };
  sleep?: Sleep;
  /** close() waits up to this long for the spool to drain (default 5 s). */
  closeDrainMs?: number;
  /**
   * The delivery ledger (the daemon's outputs): its file and the stream's epoch. Without it the sink writes
   * every record it is given (replay, shore members).
   */
  ledger?: { file: string; epoch: string };
  /** How far back each partition is read for the stream's last position (default 10,000 messages). */
  tailScan?: number;
}

/**
 * The Kafka message key: the place a record belongs to (its station, or its transect for budgets and daily
 * records), so one place's records stay in one partition, in order. Read from the record's own fields, not
 * its type, so a new record type keyed by transect needs no change here.
 */
export function kafkaKey(r: DerivedRecord): string {
  const place =
    (r as { station?: string; transect?: string }).station ?? (r as { transect?: string }).transect;
  return `${r.site}/${place ?? '-'}`;
}

/** Kafka errors as the spooled sink understands them: retriable unless the client says it is not. */
function toSinkError(err: unknown, topic: string): ReefdError {
  const e = err as { message?: string };
  const retriable = kafkaRetriable(err);
  return new ReefdError(
    'REEFD_SINK_UNAVAILABLE',
    `Kafka produce to ${topic} failed: ${e.message ?? String(err)}`,
    {
      retriable,
      cause: err,
    },
  );
}

/**
 * An ordered, idempotent Kafka sender for the spooled pump: one producer, one request in flight, acks from
 * every replica, bounded retries (past them the batch goes to the disk spool). `toMessage` turns one queued
 * entry into a Kafka message. Shared by the derived-record sink and the edge bridge.
 */
export function orderedKafkaSender(
  client: ReefdKafka,
  o: OrderedProducerOptions & {
    topic: string;
    toMessage: (entry: string) => KafkaOutMessage;
  },
): {
  send: (entries: readonly string[]) => Promise<void>;
  sendMessages: (messages: KafkaOutMessage[]) => Promise<void>;
  disconnect: () => Promise<void>;
} {
  const producer = client.orderedProducer({
    ...(o.compression !== undefined ? { compression: o.compression } : {}),
    ...(o.partitionKey !== undefined ? { partitionKey: o.partitionKey } : {}),
  });
  const sendMessages = async (messages: KafkaOutMessage[]): Promise<void> => {
    try {
      await producer.send(o.topic, messages);
    } catch (err) {
      throw toSinkError(err, o.topic);
    }
  };
  return {
    send: (entries) => sendMessages(entries.map(o.toMessage)),
    sendMessages,
    disconnect: () => producer.disconnect(),
  };
}

export async function createKafkaSink(o: KafkaSinkOptions): Promise<SpooledSink> {
  const client = openKafka(o);
  const ledger =
    o.ledger === undefined ? undefined : await DeliveryLedger.open(o.ledger.file, o.ledger.epoch);
  const sender = orderedKafkaSender(client, {
    topic: o.topic,
    toMessage: (e) => {
      const [key, value] = JSON.parse(e) as [string, string];
      return { key, value };
    },
  });
  const once =
    ledger === undefined
      ? undefined
      : new KafkaOnce(client, ledger, o.topic, o.tailScan ?? 10_000, o.logger, sender.sendMessages);
  return createSpooledSink({
    name: o.name ?? 'kafka',
    // One spool entry: [key, value JSON] (and, with a ledger, the record's identity), behind its position.
    encode: (r, pos) =>
      once === undefined
        ? { ok: true, entry: JSON.stringify([kafkaKey(r), JSON.stringify(r)]) }
        : {
            ok: true,
            entry: withPosition(pos, JSON.stringify([kafkaKey(r), JSON.stringify(r), recordKey(r)])),
          },
    send: once === undefined ? sender.send : (entries) => once.send(entries),
    batchSize: o.batchSize ?? 500,
    flushMs: o.flushMs ?? 200,
    logger: o.logger,
    backoff: o.backoff,
    sleep: o.sleep,
    closeDrainMs: o.closeDrainMs,
    spoolDir: o.spoolDir,
    spoolMaxBytes: o.spoolMaxMb * 1024 * 1024,
    onClose: async () => {
      await sender.disconnect();
      await ledger?.close();
    },
  });
}

/** Sends each stream position once per partition (see the header of this file). */
class KafkaOnce {
  readonly #client: ReefdKafka;
  readonly #ledger: DeliveryLedger;
  readonly #topic: string;
  readonly #scan: number;
  readonly #logger: Logger;
  readonly #sendMessages: (messages: KafkaOutMessage[]) => Promise<void>;
  /** partition -> highest position there; undefined until read back from the topic. */
  #hwm: Map<number, number> | undefined;
  #partitions = 0;

  constructor(
    client: ReefdKafka,
    ledger: DeliveryLedger,
    topic: string,
    scan: number,
    logger: Logger,
    sendMessages: (messages: KafkaOutMessage[]) => Promise<void>,
  ) {
    this.#client = client;
    this.#ledger = ledger;
    this.#topic = topic;
    this.#scan = scan;
    this.#logger = logger;
    this.#sendMessages = sendMessages;
  }

  async #learn(): Promise<Map<number, number>> {
    let tail: PartitionTails;
    try {
      tail = await this.#client.readTail(this.#topic, this.#ledger.epoch, this.#scan);
    } catch (err) {
      const e = toSinkError(err, this.#topic);
      if (e.retriable) throw e;
      // Not allowed to read the topic back (ACLs for a consumer group): the ledger's marks alone, so at
      // most the batch in flight at the last crash is written twice, rather than nothing written at all.
      this.#logger.warn(
        { topic: this.#topic, err },
        'kafka: cannot read the topic back; the ledger alone says what it holds',
      );
      tail = { partitions: await this.#partitionCount(), hwm: new Map() };
    }
    const hwm = new Map<number, number>();
    for (let p = 0; p < tail.partitions; p++) {
      hwm.set(p, Math.max(tail.hwm.get(p) ?? -1, this.#ledger.hwm(p)));
    }
    this.#partitions = tail.partitions;
    this.#logger.debug(
      { topic: this.#topic, hwm: Object.fromEntries(hwm) },
      'kafka: stream positions read back',
    );
    return hwm;
  }

  async #partitionCount(): Promise<number> {
    let admin: KafkaAdmin | undefined;
    try {
      admin = await this.#client.admin();
      return await admin.partitionCount(this.#topic);
    } catch (err) {
      throw toSinkError(err, this.#topic);
    } finally {
      await admin?.disconnect().catch(() => undefined);
    }
  }

  #partitionOf(key: string): number {
    return this.#client.defaultPartition(key, this.#partitions);
  }

  async send(entries: readonly string[]): Promise<{ skipped: number }> {
    await this.#ledger.ready();
    this.#hwm ??= await this.#learn();
    const hwm = this.#hwm;
    const messages: KafkaOutMessage[] = [];
    const top = new Map<number, number>();
    let skipped = 0;
    for (const e of entries) {
      const { pos, body } = splitPosition(e);
      const [key, value, id] = JSON.parse(body) as [string, string, string?];
      const partition = this.#partitionOf(key);
      if (pos !== undefined) {
        if (pos <= (hwm.get(partition) ?? -1)) {
          skipped++;
          continue;
        }
        top.set(partition, Math.max(top.get(partition) ?? -1, pos));
      }
      messages.push({
        key,
        value,
        partition,
        headers: {
          'reefd-epoch': this.#ledger.epoch,
          ...(pos !== undefined ? { 'reefd-pos': String(pos) } : {}),
          ...(id !== undefined ? { 'reefd-key': id } : {}),
        },
      });
    }
    if (messages.length > 0) {
      try {
        await this.#sendMessages(messages);
      } catch (err) {
        // Part of the batch may be in some partitions: read the ends again before the next attempt.
        this.#hwm = undefined;
        throw err;
      }
    }
    for (const [p, pos] of top) if (pos > (hwm.get(p) ?? -1)) hwm.set(p, pos);
    await this.#ledger.delivered(top);
    return { skipped };
  }
}
