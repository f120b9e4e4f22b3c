// The MQTT source against the real Mosquitto: manual PUBACK after the archive, persistent session,
// redelivery of what was never acknowledged.
import { describe, it, expect, beforeAll } from 'vitest';
import mqtt from 'mqtt';
import { createMqttSource, type MqttSource } from '../../../services/sources/mqtt-source.js';
import type { RawInput } from '../../../services/pipeline/types.js';
import { MQTT_URL, pollUntil, randomSuffix, requireService } from '../env.js';
import { quietLogger } from './fixtures.js';

beforeAll(async () => {
  await requireService('Mosquitto', MQTT_URL);
});

async function publish(topic: string, payloads: string[]): Promise<void> {
  const pub = await mqtt.connectAsync(MQTT_URL, {
    protocolVersion: 5,
    clientId: `reefd-it-pub-${randomSuffix()}`,
  });
  for (const p of payloads) await pub.publishAsync(topic, p, { qos: 1 });
  await pub.endAsync();
}

/** Removes the broker session a test left behind. */
async function dropSession(clientId: string): Promise<void> {
  const c = await mqtt.connectAsync(MQTT_URL, {
    protocolVersion: 5,
    clientId,
    clean: true,
    properties: { sessionExpiryInterval: 0 },
  });
  await c.endAsync();
}

function source(prefix: string, clientId: string, protocolVersion: 4 | 5 = 5): MqttSource {
  return createMqttSource({
    protocolVersion,
    url: MQTT_URL,
    clientId,
    cleanStart: false,
    sessionExpiryS: 300,
    topicPrefix: prefix,
    site: 'demo-reef',
    logger: quietLogger(),
    drainMs: 100,
    startTimeoutMs: 5_000,
  });
}

describe('MQTT source (Mosquitto)', () => {
  it('redelivers after reconnect exactly the messages whose ack() was never called', async () => {
    const prefix = `reefd-it-${randomSuffix()}`;
    const clientId = `reefd-it-${randomSuffix()}`;
    const topic = `${prefix}/demo-reef/crest/ctd/c1`;
    const a = source(prefix, clientId);
    const gotA: RawInput[] = [];
    await a.start((m) => gotA.push(m));
    expect(a.connected()).toBe(true);
    await new Promise((r) => setTimeout(r, 200)); // subscription in place
    await publish(topic, ['{"seq":1}', '{"seq":2}', '{"seq":3}']);
    await pollUntil('3 messages at source A', async () => (gotA.length === 3 ? true : undefined), 10_000);
    expect(gotA.map((m) => Buffer.from(m.payload).toString())).toEqual([
      '{"seq":1}',
      '{"seq":2}',
      '{"seq":3}',
    ]);
    expect(gotA[0]?.topic).toBe(topic);
    expect(a.unacked()).toBe(3);
    gotA[0]?.ack();
    gotA[2]?.ack();
    expect(a.unacked()).toBe(1);
    await a.stop();
    expect(a.connected()).toBe(false);

    // Same client id, session kept by the broker: only seq 2 comes back.
    const b = source(prefix, clientId);
    const gotB: RawInput[] = [];
    await b.start((m) => gotB.push(m));
    await pollUntil(
      'the unacknowledged message at source B',
      async () => (gotB.length >= 1 ? true : undefined),
      10_000,
    );
    await new Promise((r) => setTimeout(r, 500)); // anything else would arrive now
    expect(gotB.map((m) => Buffer.from(m.payload).toString())).toEqual(['{"seq":2}']);
    gotB[0]?.ack();
    await b.stop();

    // Acknowledged: a third connection receives nothing.
    const c = source(prefix, clientId);
    const gotC: RawInput[] = [];
    await c.start((m) => gotC.push(m));
    await new Promise((r) => setTimeout(r, 500));
    expect(gotC.length).toBe(0);
    await c.stop();
    await dropSession(clientId);
  });

  it('queues messages published while reefd is down (persistent session) and keeps many in flight', async () => {
    const prefix = `reefd-it-${randomSuffix()}`;
    const clientId = `reefd-it-${randomSuffix()}`;
    const first = source(prefix, clientId);
    await first.start(() => undefined);
    await new Promise((r) => setTimeout(r, 200));
    await first.stop();
    // reefd is down: 50 messages arrive at the broker.
    await publish(
      `${prefix}/demo-reef/back/oxygen/o2`,
      Array.from({ length: 50 }, (_, i) => `{"seq":${i}}`),
    );
    const again = source(prefix, clientId);
    const got: RawInput[] = [];
    await again.start((m) => got.push(m));
    // None is acknowledged yet, and still all 50 arrive: held PUBACKs do not stall mqtt.js' intake.
    await pollUntil('50 queued messages', async () => (got.length === 50 ? true : undefined), 10_000);
    expect(again.unacked()).toBe(50);
    expect(got.map((m) => JSON.parse(Buffer.from(m.payload).toString()).seq)).toEqual(
      Array.from({ length: 50 }, (_, i) => i),
    );
    for (const m of got) m.ack();
    expect(again.unacked()).toBe(0);
    await again.stop();
    await dropSession(clientId);
  });

  it('holds PUBACKs the same way over MQTT 3.1.1 (protocolVersion 4, e.g. for the embedded demo broker)', async () => {
    const prefix = `reefd-it-${randomSuffix()}`;
    const clientId = `reefd-it-${randomSuffix()}`;
    const a = source(prefix, clientId, 4);
    const gotA: RawInput[] = [];
    await a.start((m) => gotA.push(m));
    await new Promise((r) => setTimeout(r, 200));
    await publish(`${prefix}/demo-reef/crest/ctd/c1`, ['{"seq":1}', '{"seq":2}']);
    await pollUntil('2 messages over 3.1.1', async () => (gotA.length === 2 ? true : undefined), 10_000);
    gotA[0]?.ack();
    await a.stop();
    const b = source(prefix, clientId, 4);
    const gotB: RawInput[] = [];
    await b.start((m) => gotB.push(m));
    await pollUntil('redelivery over 3.1.1', async () => (gotB.length >= 1 ? true : undefined), 10_000);
    await new Promise((r) => setTimeout(r, 300));
    expect(gotB.map((m) => Buffer.from(m.payload).toString())).toEqual(['{"seq":2}']);
    gotB[0]?.ack();
    await b.stop();
    const c = await mqtt.connectAsync(MQTT_URL, { protocolVersion: 4, clientId, clean: true });
    await c.endAsync();
  });

  it('gets a retained message once, not again on every reconnect of the persistent session', async () => {
    const prefix = `reefd-it-${randomSuffix()}`;
    const clientId = `reefd-it-${randomSuffix()}`;
    const topic = `${prefix}/demo-reef/weather/met/m1`;
    const pub = await mqtt.connectAsync(MQTT_URL, {
      protocolVersion: 5,
      clientId: `reefd-it-${randomSuffix()}`,
    });
    await pub.publishAsync(topic, '{"seq":1}', { qos: 1, retain: true });
    const a = source(prefix, clientId);
    const gotA: RawInput[] = [];
    await a.start((m) => {
      gotA.push(m);
      m.ack();
    });
    await pollUntil('the retained message', async () => (gotA.length === 1 ? true : undefined), 10_000);
    await a.stop();
    const b = source(prefix, clientId);
    const gotB: RawInput[] = [];
    await b.start((m) => gotB.push(m));
    await new Promise((r) => setTimeout(r, 500));
    expect(gotB.length).toBe(0);
    await b.stop();
    await pub.publishAsync(topic, '', { qos: 1, retain: true }); // clears the retained message
    await pub.endAsync();
    await dropSession(clientId);
  });
});
