// A private Mosquitto restarted from its persistence file while the MQTT source holds PUBACKs (their
// archive lines not yet durable): the broker sends the messages again, marked as redeliveries. And a copy
// of a message acknowledged just before the connection dropped, arriving as a new message (a publisher
// whose own PUBACK the broker's restart lost sends it again; the broker forwards it without DUP): the
// source marks it as a redelivery too, so the pipeline archives each message once.
import mqtt from 'mqtt';
import { afterAll, describe, expect, it } from 'vitest';
import type { RawInput } from '../../../services/pipeline/types.js';
import { createMqttSource } from '../../../services/sources/mqtt-source.js';
import { startPrivateMosquitto, startTcpProxy, type PrivateMosquitto } from '../../faults/helpers/procs.js';
import { pollUntil, randomSuffix } from '../env.js';
import { quietLogger } from './fixtures.js';

let mosq: PrivateMosquitto | undefined;
afterAll(async () => {
  await mosq?.stop();
});

describe('MQTT source across a broker restart', () => {
  it('marks the messages it held unacknowledged as redeliveries when the broker sends them again', async () => {
    mosq = await startPrivateMosquitto();
    const id = randomSuffix();
    const prefix = `reefd-it-${id}`;
    const src = createMqttSource({
      url: mosq.url,
      clientId: `reefd-it-${id}`,
      cleanStart: false,
      sessionExpiryS: 300,
      topicPrefix: prefix,
      site: 'demo-reef',
      logger: quietLogger(),
      reconnect: { baseMs: 100, maxMs: 400 },
      drainMs: 50,
    });
    const got: RawInput[] = [];
    // The first five are held (never acknowledged) until the broker is gone; later copies are acknowledged.
    await src.start((m) => {
      got.push(m);
      if (got.length > 5) m.ack();
    });
    const pub = await mqtt.connectAsync(mosq.url, { protocolVersion: 5, clientId: `pub-${id}` });
    for (let i = 0; i < 5; i++)
      await pub.publishAsync(`${prefix}/demo-reef/crest/par/l1`, JSON.stringify({ v: 1, seq: i }), {
        qos: 1,
      });
    await pub.endAsync();
    await pollUntil('five messages held', async () => (got.length >= 5 ? true : undefined), 5000, 20);
    await mosq.restart(300);
    await pollUntil('the five sent again', async () => (got.length >= 10 ? true : undefined), 20_000, 50);
    await src.stop();
    const first = got.slice(0, 5).map((m) => Buffer.from(m.payload).toString());
    const again = got.slice(5, 10);
    expect(again.map((m) => Buffer.from(m.payload).toString()).sort()).toEqual([...first].sort());
    expect(again.every((m) => m.redelivered === true)).toBe(true);
    expect(got.slice(0, 5).some((m) => m.redelivered === true)).toBe(false);
  });

  it('marks the first copy of a message acknowledged just before a drop as a redelivery, not a later one', async () => {
    mosq ??= await startPrivateMosquitto();
    const relay = await startTcpProxy(mosq.port);
    const id = randomSuffix();
    const prefix = `reefd-it-${id}`;
    const src = createMqttSource({
      url: `mqtt://127.0.0.1:${relay.port}`,
      clientId: `reefd-it-${id}`,
      cleanStart: false,
      sessionExpiryS: 300,
      topicPrefix: prefix,
      site: 'demo-reef',
      logger: quietLogger(),
      reconnect: { baseMs: 100, maxMs: 400 },
      drainMs: 50,
    });
    const got: RawInput[] = [];
    await src.start((m) => {
      got.push(m);
      m.ack();
    });
    const pub = await mqtt.connectAsync(mosq.url, { protocolVersion: 5, clientId: `pub-${id}` });
    const topic = `${prefix}/demo-reef/crest/par/l1`;
    const body = JSON.stringify({ v: 1, seq: 1 });
    await pub.publishAsync(topic, body, { qos: 1 });
    await pollUntil('the message', async () => (got.length >= 1 ? true : undefined), 5000, 20);
    relay.cut();
    await pollUntil(
      'the source notices the drop',
      async () => (src.connected() ? undefined : true),
      5000,
      20,
    );
    relay.restore();
    await pollUntil('reconnected', async () => (src.connected() ? true : undefined), 10_000, 20);
    // The same bytes again (the retransmit), then once more (a sensor repeating itself: a new message), then
    // an end mark: everything before it has arrived once the mark has.
    await pub.publishAsync(topic, body, { qos: 1 });
    await pub.publishAsync(topic, body, { qos: 1 });
    await pub.publishAsync(topic, JSON.stringify({ v: 1, seq: 2 }), { qos: 1 });
    await pollUntil(
      'the end mark',
      async () => (got.some((m) => m.payload.includes(0x32)) ? true : undefined),
      5000,
      20,
    );
    await pub.endAsync();
    await src.stop();
    await relay.close();
    const flags = got.slice(0, -1).map((m) => m.redelivered === true);
    // If our PUBACK was lost in the cut, the broker also sends the first copy again (with DUP): a
    // redelivery either way. The retransmit is one; the later repeat is a new message.
    expect(flags.length === 3 || flags.length === 4).toBe(true);
    expect(flags[0]).toBe(false);
    expect(flags.slice(1, -1).every((f) => f)).toBe(true);
    expect(flags.at(-1)).toBe(false);
  });
});
