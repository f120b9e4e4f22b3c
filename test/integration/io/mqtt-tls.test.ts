// The MQTT source's TLS and credentials against a Mosquitto with TLS and a password file: certificate
// checks are on by default, a wrong CA or a wrong password keeps the source disconnected.
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import mqtt from 'mqtt';
import { readFileSync } from 'node:fs';
import { createMqttSource, type MqttSourceOptions } from '../../../services/sources/mqtt-source.js';
import type { RawInput } from '../../../services/pipeline/types.js';
import { pollUntil, randomSuffix } from '../env.js';
import { startTlsBroker, type PrivateBroker } from './private-mosquitto.js';
import { quietLogger } from './fixtures.js';

let broker: PrivateBroker;
const PASSWORD = `pw-${randomSuffix()}`;

beforeAll(async () => {
  broker = await startTlsBroker('reefd', PASSWORD);
});
afterAll(async () => {
  await broker?.stop();
});

function opts(extra: Partial<MqttSourceOptions>): MqttSourceOptions {
  return {
    url: broker.url,
    clientId: `reefd-it-${randomSuffix()}`,
    cleanStart: true,
    sessionExpiryS: 0,
    topicPrefix: 'reef',
    site: 'tls-reef',
    logger: quietLogger(),
    startTimeoutMs: 1_500,
    reconnect: { baseMs: 5_000, maxMs: 5_000 },
    ...extra,
  };
}

describe('MQTT source over TLS with a password', () => {
  it('connects with the CA file and credentials and receives messages', async () => {
    const src = createMqttSource(
      opts({ username: 'reefd', password: PASSWORD, tls: { ca_file: broker.caFile } }),
    );
    const got: RawInput[] = [];
    await src.start((m) => {
      got.push(m);
      m.ack();
    });
    expect(src.connected()).toBe(true);
    await new Promise((r) => setTimeout(r, 200));
    const pub = await mqtt.connectAsync(broker.url, {
      protocolVersion: 5,
      username: 'reefd',
      password: PASSWORD,
      ca: readFileSync(broker.caFile),
    });
    await pub.publishAsync('reef/tls-reef/crest/par/l1', '{"v":1}', { qos: 1 });
    await pub.endAsync();
    await pollUntil('a message over TLS', async () => (got.length === 1 ? true : undefined), 5_000);
    expect(got[0]?.topic).toBe('reef/tls-reef/crest/par/l1');
    await src.stop();
  });

  it('refuses a broker whose certificate is not signed by the configured CA (verify on by default)', async () => {
    const src = createMqttSource(
      opts({ username: 'reefd', password: PASSWORD, tls: { ca_file: broker.otherCaFile } }),
    );
    await src.start(() => undefined);
    expect(src.connected()).toBe(false);
    await src.stop();
  });

  it('connects to the same broker with verify: false (test benches only)', async () => {
    const src = createMqttSource(
      opts({ username: 'reefd', password: PASSWORD, tls: { ca_file: broker.otherCaFile, verify: false } }),
    );
    await src.start(() => undefined);
    expect(src.connected()).toBe(true);
    await src.stop();
  });

  it('stays disconnected with a wrong password', async () => {
    const src = createMqttSource(
      opts({ username: 'reefd', password: 'wrong', tls: { ca_file: broker.caFile } }),
    );
    await src.start(() => undefined);
    expect(src.connected()).toBe(false);
    await src.stop();
  });
});
