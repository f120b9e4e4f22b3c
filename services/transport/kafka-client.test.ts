// The parts of the Kafka client interface that need no broker: the default partitioner and the error rule.
// The produce, admin and tail operations run against the loopback broker in test/integration/io
// (sink-kafka, outputs-once) and test/integration/scaleout.
import { describe, expect, it } from 'vitest';
import { kafkaRetriable, openKafka } from './kafka-client.js';
import type { Logger } from '../log/logger.js';

/** murmur2 as the Java client's default partitioner computes it (common practice), written out here. */
function murmur2(bytes: Uint8Array): number {
  const m = 0x5bd1e995;
  let h = 0x9747b28c ^ bytes.length;
  const whole = bytes.length & ~3;
  for (let i = 0; i < whole; i += 4) {
    let k = bytes[i]! | (bytes[i + 1]! << 8) | (bytes[i + 2]! << 16) | (bytes[i + 3]! << 24);
    k = Math.imul(k, m);
    k ^= k >>> 24;
    k = Math.imul(k, m);
    h = Math.imul(h, m) ^ k;
  }
  const rest = bytes.length & 3;
  if (rest === 3) h ^= bytes[whole + 2]! << 16;
  if (rest >= 2) h ^= bytes[whole + 1]! << 8;
  if (rest >= 1) {
    h ^= bytes[whole]!;
    h = Math.imul(h, m);
  }
  h ^= h >>> 13;
  h = Math.imul(h, m);
  h ^= h >>> 15;
  return h | 0;
}

const silent = { error: () => undefined, warn: () => undefined, debug: () => undefined } as unknown as Logger;
const kafka = openKafka({ brokers: ['127.0.0.1:1'], clientId: 'reefd-test', logger: silent });

describe('Kafka client interface', () => {
  it('writes out murmur2 as the Java client does', () => {
    // From memory: the Java client's own unit test expects murmur2("21") = -973932308.
    expect(murmur2(new TextEncoder().encode('21'))).toBe(-973932308);
  });

  it('places keys with the default (murmur2) partitioner, positive-masked modulo the count', () => {
    for (const key of ['ornen-reef', 'ornen-reef/crest', 'a', 'ab', 'abc', 'abcd', 'abcde', '']) {
      for (const n of [1, 3, 8, 12]) {
        const want = (murmur2(new TextEncoder().encode(key)) & 0x7fffffff) % n;
        expect(kafka.defaultPartition(key, n)).toBe(want);
      }
    }
  });

  it('treats only a final protocol refusal as not retriable', () => {
    expect(kafkaRetriable({ name: 'KafkaJSProtocolError', retriable: false })).toBe(false);
    expect(kafkaRetriable({ name: 'KafkaJSProtocolError', retriable: true })).toBe(true);
    expect(kafkaRetriable(new Error('connection closed'))).toBe(true);
    expect(kafkaRetriable(null)).toBe(true);
  });
});
