// Proof that the dev/CI Mosquitto broker works from the code: QoS 1 publish/subscribe with the
// mqtt package, and a persistent session that queues more messages than Mosquitto's default
// limit of 1000 (deploy/dev/mosquitto.conf raises max_queued_messages deliberately).
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import mqtt, { type IClientOptions, type MqttClient } from 'mqtt';
import { MQTT_URL, itTopic, pollUntil, randomSuffix, requireService } from '../env.js';

const open: MqttClient[] = [];

async function connected(
  options: IClientOptions,
  onMessage?: (topic: string, payload: Buffer, qos: number) => void,
) {
  // Listener first: a persistent session's queued messages can arrive right after CONNACK.
  const client = mqtt.connect(MQTT_URL, { reconnectPeriod: 0, connectTimeout: 5_000, ...options });
  open.push(client);
  if (onMessage) client.on('message', (topic, payload, packet) => onMessage(topic, payload, packet.qos));
  const connack = await new Promise<{ sessionPresent: boolean }>((resolve, reject) => {
    client.once('connect', (ack) => resolve({ sessionPresent: ack.sessionPresent }));
    client.once('error', reject);
  });
  return { client, sessionPresent: connack.sessionPresent };
}

beforeAll(async () => {
  await requireService('mosquitto', MQTT_URL);
});

afterEach(async () => {
  await Promise.all(open.splice(0).map((c) => c.endAsync(true)));
});

describe('Mosquitto (real broker)', () => {
  it('delivers 500 QoS 1 messages to a subscriber, in order and intact', async () => {
    const topic = itTopic();
    const count = 500;
    const got: { topic: string; seq: number; qos: number }[] = [];
    const { client: sub } = await connected({ clientId: `${topic}-sub` }, (t, payload, qos) => {
      const msg = JSON.parse(payload.toString('utf8')) as { seq: number };
      got.push({ topic: t, seq: msg.seq, qos });
    });
    await sub.subscribeAsync(`${topic}/#`, { qos: 1 });
    const { client: pub } = await connected({ clientId: `${topic}-pub` });
    for (let seq = 0; seq < count; seq++) {
      const payload = JSON.stringify({
        v: 1,
        t: new Date(Date.UTC(2026, 0, 1, 0, 0, seq)).toISOString(),
        seq,
        temp_c: 27.5,
      });
      await pub.publishAsync(`${topic}/demo-reef/crest/ctd/ctd1`, payload, { qos: 1 });
    }
    await pollUntil('all QoS 1 messages', async () => (got.length >= count ? true : undefined), 20_000);
    expect(got).toHaveLength(count);
    // One publisher, one topic, QoS 1: MQTT keeps the publication order (common practice).
    expect(got.map((m) => m.seq)).toEqual(Array.from({ length: count }, (_, i) => i));
    expect(new Set(got.map((m) => m.qos))).toEqual(new Set([1]));
    expect(got[0]?.topic).toBe(`${topic}/demo-reef/crest/ctd/ctd1`);
  }, 60_000);

  it('queues 2500 QoS 1 messages for an offline persistent session (beyond the default limit of 1000)', async () => {
    const topic = itTopic();
    const clientId = `reefd-it-${randomSuffix()}`;
    const count = 2_500;
    const first = await connected({ clientId, clean: false });
    expect(first.sessionPresent).toBe(false);
    await first.client.subscribeAsync(`${topic}/#`, { qos: 1 });
    await first.client.endAsync();

    const { client: pub } = await connected({ clientId: `${clientId}-pub` });
    const sends: Promise<unknown>[] = [];
    for (let seq = 0; seq < count; seq++) {
      sends.push(
        pub.publishAsync(`${topic}/demo-reef/back/par/par1`, JSON.stringify({ v: 1, seq }), { qos: 1 }),
      );
    }
    await Promise.all(sends);

    const seen = new Set<number>();
    const again = await connected({ clientId, clean: false }, (_t, payload, qos) => {
      if (qos === 1) seen.add((JSON.parse(payload.toString('utf8')) as { seq: number }).seq);
    });
    expect(again.sessionPresent).toBe(true);
    await pollUntil('the queued backlog', async () => (seen.size >= count ? true : undefined), 30_000);
    expect(seen.size).toBe(count);
    expect(Math.min(...seen)).toBe(0);
    expect(Math.max(...seen)).toBe(count - 1);
    // Drop the session so the broker does not keep it for persistent_client_expiration.
    await again.client.endAsync();
    const cleanup = await connected({ clientId, clean: true });
    await cleanup.client.endAsync();
  }, 90_000);
});
