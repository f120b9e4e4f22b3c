// Kafka intake (contract section 1): a consumer group on the configured topic. Offsets are committed only
// for messages whose ack() was called, i.e. whose archive line and derived records are durable: eachBatch
// with manual resolveOffset, the highest contiguous acknowledged offset resolved, commitOffsetsIfNecessary.
// A stop or rebalance mid-batch leaves unacknowledged offsets uncommitted, so those messages come again.
import type { Consumer, EachBatchPayload } from 'kafkajs';
import type { RawInput, Source } from '../pipeline/types.js';
import type { Logger } from '../log/logger.js';
import { kafkaClient } from '../transport/kafka-client.js';
import type { TlsFiles } from '../transport/tls.js';
import { kafkaTopicOf } from './kafka-topic.js';

export interface KafkaSourceOptions {
  brokers: readonly string[];
  clientId: string;
  groupId: string;
  topic: string;
  topicPrefix: string;
  tls?: TlsFiles | undefined;
  sasl?:
    | { mechanism: 'plain' | 'scram-sha-256' | 'scram-sha-512'; username: string; password: string }
    | undefined;
  logger: Logger;
  clock?: () => number;
  /** A new group starts at the earliest offset (default true: nothing on the topic is skipped). */
  fromBeginning?: boolean;
  /** Heartbeat while waiting for acknowledgements (default 3 s; below the 30 s session timeout). */
  heartbeatMs?: number;
}

export interface KafkaSource extends Source {
  unacked(): number;
}

class KafkaIntake implements KafkaSource {
  readonly name = 'kafka';
  readonly #o: KafkaSourceOptions;
  #consumer: Consumer | undefined;
  #connected = false;
  #stopping = false;
  #unacked = 0;
  /** Wakes every batch waiting for acknowledgements (on stop). */
  #abandon = new Set<() => void>();

  constructor(o: KafkaSourceOptions) {
    this.#o = o;
  }

  async start(push: (input: RawInput) => void): Promise<void> {
    const o = this.#o;
    const consumer = kafkaClient(o).consumer({
      groupId: o.groupId,
      allowAutoTopicCreation: false,
    });
    this.#consumer = consumer;
    consumer.on(consumer.events.GROUP_JOIN, () => {
      this.#connected = true;
      o.logger.info({ topic: o.topic, groupId: o.groupId }, 'kafka consumer joined its group');
    });
    consumer.on(consumer.events.CRASH, (e) => {
      this.#connected = false;
      o.logger.error(
        { err: (e.payload.error as Error | undefined)?.message },
        'kafka consumer crashed; kafkajs restarts it',
      );
    });
    consumer.on(consumer.events.DISCONNECT, () => (this.#connected = false));
    consumer.on(consumer.events.STOP, () => (this.#connected = false));
    await consumer.connect();
    await consumer.subscribe({ topics: [o.topic], fromBeginning: o.fromBeginning ?? true });
    await consumer.run({
      eachBatchAutoResolve: false,
      autoCommit: true,
      autoCommitInterval: 1000,
      eachBatch: (p) => this.#batch(p, push),
    });
  }

  async #batch(p: EachBatchPayload, push: (input: RawInput) => void): Promise<void> {
    const { batch } = p;
    const o = this.#o;
    const acked = batch.messages.map(() => false);
    let wake: (() => void) | undefined;
    const waker = (): void => wake?.();
    this.#abandon.add(waker);
    try {
      batch.messages.forEach((m, i) => {
        if (this.#stopping) return;
        this.#unacked++;
        push({
          topic: kafkaTopicOf(o.topicPrefix, m.key, m.value),
          payload: m.value ?? new Uint8Array(0),
          rxMs: (o.clock ?? Date.now)(),
          ack: () => {
            if (acked[i]) return;
            acked[i] = true;
            this.#unacked--;
            waker();
          },
        });
      });
      // Resolve offsets in order, as far as the acknowledgements reach.
      let next = 0;
      while (next < batch.messages.length) {
        while (next < batch.messages.length && acked[next]) {
          p.resolveOffset((batch.messages[next] as { offset: string }).offset);
          next++;
        }
        if (next >= batch.messages.length) break;
        if (this.#stopping || !p.isRunning() || p.isStale()) break;
        await p.commitOffsetsIfNecessary();
        await new Promise<void>((resolve) => {
          const t = setTimeout(resolve, o.heartbeatMs ?? 3_000);
          wake = () => {
            clearTimeout(t);
            resolve();
          };
        });
        wake = undefined;
        await p.heartbeat();
      }
      await p.commitOffsetsIfNecessary();
    } finally {
      this.#abandon.delete(waker);
    }
  }

  async stop(): Promise<void> {
    if (this.#consumer === undefined || this.#stopping) return;
    this.#stopping = true;
    for (const w of this.#abandon) w();
    await this.#consumer.disconnect();
    this.#connected = false;
  }

  connected(): boolean {
    return this.#connected;
  }

  unacked(): number {
    return this.#unacked;
  }
}

export function createKafkaSource(opts: KafkaSourceOptions): KafkaSource {
  return new KafkaIntake(opts);
}
