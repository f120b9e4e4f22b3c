// The dead-letter output: rejected messages with their reason, as NDJSON to a file and optionally to an MQTT
// or Kafka topic. Rate-limited (max_per_min, a token bucket refilled evenly over the minute) so a broken
// sensor cannot flood the disk or the broker; suppressed letters are counted and one summary line per
// minute says how many (they are all still in the raw archive, with their reject reason).
import { open } from 'node:fs/promises';
import type { DeadLetter, DeadLetterSink } from '../pipeline/types.js';
import type { Logger } from '../log/logger.js';
import { TextFile } from './text-file.js';

/** Something that publishes one text message to a topic (the daemon's MQTT client or Kafka producer). */
export interface TopicPublisher {
  publish(topic: string, payload: string, key?: string): Promise<void>;
}

export interface DeadLetterOptions {
  path?: string | undefined;
  mqtt?: { publisher: TopicPublisher; topic: string } | undefined;
  kafka?: { publisher: TopicPublisher; topic: string } | undefined;
  maxPerMin: number;
  clock: () => number;
  logger: Logger;
  /** How often the summary of suppressed letters is written (default 60 s); 0 = only on flush/close. */
  summaryEveryMs?: number;
}

class DeadLetters implements DeadLetterSink {
  readonly #o: DeadLetterOptions;
  readonly #file: TextFile | undefined;
  #tokens: number;
  #lastRefillMs: number;
  #suppressed = 0;
  #unreported = 0;
  #windowStartMs: number;
  #publishes: Promise<void>[] = [];
  #timer: NodeJS.Timeout | undefined;

  constructor(o: DeadLetterOptions, file: TextFile | undefined) {
    this.#o = o;
    this.#file = file;
    this.#tokens = o.maxPerMin;
    this.#lastRefillMs = o.clock();
    this.#windowStartMs = this.#lastRefillMs;
    const every = o.summaryEveryMs ?? 60_000;
    if (every > 0) {
      this.#timer = setInterval(() => this.#summary(), every);
      this.#timer.unref();
    }
  }

  #take(): boolean {
    const now = this.#o.clock();
    const refill = ((now - this.#lastRefillMs) / 60_000) * this.#o.maxPerMin;
    this.#tokens = Math.min(this.#o.maxPerMin, this.#tokens + refill);
    this.#lastRefillMs = now;
    if (this.#tokens < 1) return false;
    this.#tokens -= 1;
    return true;
  }

  write(letter: DeadLetter): void {
    if (!this.#take()) {
      this.#suppressed++;
      this.#unreported++;
      return;
    }
    this.#emit(
      JSON.stringify({
        topic: letter.topic,
        rx: new Date(letter.rxMs).toISOString(),
        reason: letter.reason,
        payload: letter.payload,
      }),
      letter.topic,
    );
  }

  #emit(line: string, key: string): void {
    this.#file?.write(line + '\n');
    for (const out of [this.#o.mqtt, this.#o.kafka]) {
      if (out === undefined) continue;
      const p = out.publisher.publish(out.topic, line, key).catch((err: unknown) => {
        this.#o.logger.warn(
          { err: (err as Error).message, topic: out.topic },
          'dead letter could not be published',
        );
      });
      this.#publishes.push(p);
      // Bounded: settled publishes are forgotten.
      if (this.#publishes.length > 1000) this.#publishes = this.#publishes.slice(-1000);
    }
  }

  #summary(): void {
    const now = this.#o.clock();
    if (this.#unreported > 0) {
      const n = this.#unreported;
      this.#emit(
        JSON.stringify({
          summary: `${n} suppressed`,
          suppressed: n,
          from: new Date(this.#windowStartMs).toISOString(),
          to: new Date(now).toISOString(),
        }),
        'summary',
      );
      this.#o.logger.warn(
        { suppressed: n },
        'dead letters suppressed by the rate limit (still in the raw archive)',
      );
      this.#unreported = 0;
    }
    this.#windowStartMs = now;
  }

  async flush(): Promise<void> {
    this.#summary();
    await Promise.all(this.#publishes);
    this.#publishes = [];
    await this.#file?.flush();
  }

  async close(): Promise<void> {
    if (this.#timer !== undefined) clearInterval(this.#timer);
    await this.flush();
    await this.#file?.close();
  }

  suppressed(): number {
    return this.#suppressed;
  }
}

/** Dead letters to MQTT at QoS 1 through the daemon's client. */
export function mqttPublisher(client: {
  publishAsync(topic: string, payload: string, opts: { qos: 1 }): Promise<unknown>;
}): TopicPublisher {
  return { publish: async (topic, payload) => void (await client.publishAsync(topic, payload, { qos: 1 })) };
}

/** Dead letters to Kafka (acks = -1), keyed by the original topic. */
export function kafkaPublisher(producer: {
  send(r: { topic: string; acks: number; messages: { key?: string; value: string }[] }): Promise<unknown>;
}): TopicPublisher {
  return {
    publish: async (topic, payload, key) =>
      void (await producer.send({
        topic,
        acks: -1,
        messages: [key !== undefined ? { key, value: payload } : { value: payload }],
      })),
  };
}

export async function createDeadLetterSink(o: DeadLetterOptions): Promise<DeadLetterSink> {
  const file = o.path !== undefined ? new TextFile(await open(o.path, 'a')) : undefined;
  return new DeadLetters(o, file);
}
