import { describe, it, expect } from 'vitest';
import { createServer } from 'node:net';
import type { AddressInfo } from 'node:net';
import mqtt from 'mqtt';
import { createMqttChannel, createNotifier, NotifyError } from './index.js';
import { alert, idleTimers, manualClock, tempDir } from './test-helpers.js';

describe('MQTT channel against an in-process broker on port 0', () => {
  it('publishes grouped alerts as JSON on the topic, and fails retriably while disconnected', async () => {
    const { Aedes } = await import('aedes');
    const broker = await Aedes.createBroker();
    const server = createServer(broker.handle);
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
    const url = `mqtt://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const topic = `reef/demo-reef/alerts-${process.pid}`;
    const sub = await mqtt.connectAsync(url);
    const got: string[] = [];
    const arrived = new Promise<void>((resolve) =>
      sub.on('message', (_t, p) => {
        got.push(p.toString('utf8'));
        resolve();
      }),
    );
    await sub.subscribeAsync(topic, { qos: 1 });
    const pub = await mqtt.connectAsync(url);
    try {
      const clock = manualClock();
      const ch = createMqttChannel({ id: 'bus', client: pub, topic, site: 'demo-reef' });
      const n = createNotifier({
        dir: await tempDir(),
        site: 'demo-reef',
        clock,
        timers: idleTimers,
        channels: [ch],
      });
      await n.start();
      await n.enqueue(alert({ rule: 'stale', fault: 'stale', station: 'crest', sensor: 'a' }));
      await n.enqueue(alert({ rule: 'stale', fault: 'stale', station: 'crest', sensor: 'b' }));
      clock.advance(31_000);
      await n.tick();
      expect(n.status().pending).toEqual({ bus: 0 }); // the QoS 1 PUBACK came back
      await n.stop();
      await arrived;
      expect(got).toHaveLength(1);
      const m = JSON.parse(got[0]!) as { kind: string; alerts: { sensor: string }[] };
      expect(m.kind).toBe('alerts');
      expect(m.alerts.map((a) => a.sensor)).toEqual(['a', 'b']);
      await pub.endAsync();
      const err = await ch.send({ kind: 'alerts', subject: 's', text: 't', alerts: [], seqs: [] }).then(
        () => null,
        (e: unknown) => e,
      );
      expect(err).toBeInstanceOf(NotifyError);
      expect((err as NotifyError).retriable).toBe(true);
    } finally {
      await sub.endAsync();
      if (pub.connected) await pub.endAsync();
      await new Promise<void>((r) => broker.close(() => r()));
      await new Promise<void>((r) => server.close(() => r()));
    }
  });
});
