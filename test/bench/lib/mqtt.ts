// MQTT helpers of the benchmarks: a QoS 1 publisher with a bounded window, and the baseline every intake
// figure is compared with, a no-op mqtt.js subscriber on the same broker.
import mqtt, { type MqttClient } from 'mqtt';
import { MQTT_URL, randomSuffix } from '../../integration/env.js';

export const connect = (id: string, clean = true): Promise<MqttClient> =>
  mqtt.connectAsync(MQTT_URL, { clientId: id, protocolVersion: 5, clean, reconnectPeriod: 0 });

export interface Outgoing {
  /** Topic after the prefix, e.g. `site/station/kind/sensor`. */
  rest: string;
  payload: Buffer;
}

/** Publishes `list` at QoS 1 with at most `window` unacknowledged, as fast as the broker takes them. */
export async function publishAll(
  client: MqttClient,
  prefix: string,
  list: readonly Outgoing[],
  window = 1000,
): Promise<void> {
  let inflight = 0;
  let wake: (() => void) | undefined;
  for (const m of list) {
    while (inflight >= window) await new Promise<void>((r) => (wake = r));
    inflight++;
    client.publish(`${prefix}/${m.rest}`, m.payload, { qos: 1 }, () => {
      inflight--;
      const w = wake;
      wake = undefined;
      w?.();
    });
  }
  while (inflight > 0) await new Promise<void>((r) => (wake = r));
}

/**
 * Messages per second a no-op mqtt.js subscriber (QoS 1, acknowledging at once) receives from one
 * publisher with 1,000 in flight, first publish to last message.
 */
export async function noOpSubscriberRate(list: readonly Outgoing[]): Promise<number> {
  const prefix = `bench-${randomSuffix()}`;
  const sub = await connect(`bench-sub-${prefix}`);
  let got = 0;
  let last = 0;
  let done: () => void = () => {};
  const all = new Promise<void>((r) => (done = r));
  sub.on('message', () => {
    last = performance.now();
    if (++got === list.length) done();
  });
  await sub.subscribeAsync(`${prefix}/#`, { qos: 1 });
  const pub = await connect(`bench-pub-${prefix}`);
  const t0 = performance.now();
  await publishAll(pub, prefix, list);
  await Promise.race([all, new Promise((r) => setTimeout(r, 120_000))]);
  await pub.endAsync();
  await sub.endAsync();
  if (got !== list.length) console.log(`  no-op subscriber received ${got} of ${list.length}`);
  return (got / (last - t0)) * 1000;
}
