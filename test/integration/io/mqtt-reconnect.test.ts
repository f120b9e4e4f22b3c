// The MQTT source loses its connection (a TCP relay we control in front of Mosquitto drops every socket)
// and reconnects with backoff; messages published meanwhile arrive through the persistent session.
import { describe, it, expect, beforeAll } from 'vitest';
import { createServer, connect, type Socket, type AddressInfo } from 'node:net';
import mqtt from 'mqtt';
import { createMqttSource } from '../../../services/sources/mqtt-source.js';
import type { RawInput } from '../../../services/pipeline/types.js';
import { MQTT_URL, hostPort, pollUntil, randomSuffix, requireService } from '../env.js';
import { quietLogger } from './fixtures.js';

beforeAll(async () => {
  await requireService('Mosquitto', MQTT_URL);
});

describe('MQTT source reconnect', () => {
  it('reconnects after the connection drops and receives what was published while it was away', async () => {
    const target = hostPort(MQTT_URL);
    const sockets = new Set<Socket>();
    let accepting = true;
    const relay = createServer((client) => {
      if (!accepting) return client.destroy();
      const upstream = connect(target.port, target.host);
      for (const s of [client, upstream]) {
        sockets.add(s);
        s.on('close', () => sockets.delete(s));
        s.on('error', () => undefined);
      }
      client.pipe(upstream).pipe(client);
    });
    await new Promise<void>((r) => relay.listen(0, '127.0.0.1', r));
    const port = (relay.address() as AddressInfo).port;

    const prefix = `reefd-it-${randomSuffix()}`;
    const clientId = `reefd-it-${randomSuffix()}`;
    const src = createMqttSource({
      url: `mqtt://127.0.0.1:${port}`,
      clientId,
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
    await new Promise((r) => setTimeout(r, 200));
    // Cut every connection and refuse new ones for a while.
    accepting = false;
    for (const s of sockets) s.destroy();
    await pollUntil('source notices the drop', async () => (src.connected() ? undefined : true), 5_000, 20);
    const pub = await mqtt.connectAsync(MQTT_URL, {
      protocolVersion: 5,
      clientId: `reefd-it-${randomSuffix()}`,
    });
    await pub.publishAsync(`${prefix}/demo-reef/crest/par/l1`, '{"seq":7}', { qos: 1 });
    await pub.endAsync();
    await new Promise((r) => setTimeout(r, 500)); // a few refused attempts
    expect(src.connected()).toBe(false);
    accepting = true;
    await pollUntil(
      'source back and the queued message in',
      async () => (got.length >= 1 ? true : undefined),
      10_000,
      20,
    );
    expect(src.connected()).toBe(true);
    expect(got.map((m) => Buffer.from(m.payload).toString())).toEqual(['{"seq":7}']);
    await src.stop();
    const c = await mqtt.connectAsync(MQTT_URL, {
      protocolVersion: 5,
      clientId,
      clean: true,
      properties: { sessionExpiryInterval: 0 },
    });
    await c.endAsync();
    await new Promise<void>((r) => relay.close(() => r()));
  });

  it('ignores an ack() from before a reconnect, and the broker redelivers that message', async () => {
    const target = hostPort(MQTT_URL);
    const sockets = new Set<Socket>();
    const relay = createServer((client) => {
      const upstream = connect(target.port, target.host);
      for (const s of [client, upstream]) {
        sockets.add(s);
        s.on('close', () => sockets.delete(s));
        s.on('error', () => undefined);
      }
      client.pipe(upstream).pipe(client);
    });
    await new Promise<void>((r) => relay.listen(0, '127.0.0.1', r));
    const port = (relay.address() as AddressInfo).port;
    const prefix = `reefd-it-${randomSuffix()}`;
    const clientId = `reefd-it-${randomSuffix()}`;
    const src = createMqttSource({
      url: `mqtt://127.0.0.1:${port}`,
      clientId,
      cleanStart: false,
      sessionExpiryS: 300,
      topicPrefix: prefix,
      site: 'demo-reef',
      logger: quietLogger(),
      reconnect: { baseMs: 100, maxMs: 200 },
      drainMs: 50,
    });
    const got: RawInput[] = [];
    await src.start((m) => got.push(m));
    await new Promise((r) => setTimeout(r, 200));
    const pub = await mqtt.connectAsync(MQTT_URL, {
      protocolVersion: 5,
      clientId: `reefd-it-${randomSuffix()}`,
    });
    await pub.publishAsync(`${prefix}/demo-reef/crest/par/l1`, '{"seq":1}', { qos: 1 });
    await pollUntil('first delivery', async () => (got.length >= 1 ? true : undefined), 10_000, 20);
    for (const s of sockets) s.destroy();
    await pollUntil(
      'redelivery after reconnect',
      async () => (got.length >= 2 ? true : undefined),
      10_000,
      20,
    );
    // The old ack belongs to the lost connection: it must not acknowledge whatever now has that id.
    got[0]?.ack();
    expect(src.unacked()).toBe(1);
    expect(got.map((m) => Buffer.from(m.payload).toString())).toEqual(['{"seq":1}', '{"seq":1}']);
    got[1]?.ack();
    expect(src.unacked()).toBe(0);
    await pub.endAsync();
    await src.stop();
    const c = await mqtt.connectAsync(MQTT_URL, {
      protocolVersion: 5,
      clientId,
      clean: true,
      properties: { sessionExpiryInterval: 0 },
    });
    await c.endAsync();
    for (const s of sockets) s.destroy();
    await new Promise<void>((r) => relay.close(() => r()));
  });
});
