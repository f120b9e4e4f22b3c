// Publishing simulated sensor messages to the real broker, as a field network would: QoS 1, one client,
// topics moved from the simulator's prefix to the test's own.
import mqtt, { type MqttClient } from 'mqtt';
import type { SimMessage } from '../../../libs/simulator/index.js';

/** The simulator's topic (`reef/<site>/...`) under another prefix (and, when given, another site). */
export function withPrefix(topic: string, prefix: string, site?: string): string {
  const parts = topic.split('/');
  if (site !== undefined && parts.length > 1) parts[1] = site;
  return [prefix, ...parts.slice(1)].join('/');
}

export async function connectPublisher(url: string, clientId: string): Promise<MqttClient> {
  return mqtt.connectAsync(url, { clientId, protocolVersion: 5, clean: true, reconnectPeriod: 0 });
}

/**
 * Publishes messages in order at QoS 1 and resolves once the broker acknowledged all of them.
 * `inflight` bounds the unacknowledged publishes (mqtt.js keeps their order on one connection).
 */
export async function publishAll(
  client: MqttClient,
  messages: readonly { topic: string; payload: string | Buffer }[],
  inflight = 64,
): Promise<void> {
  const pending = new Set<Promise<unknown>>();
  for (const m of messages) {
    const p = client.publishAsync(m.topic, m.payload, { qos: 1 });
    pending.add(p);
    void p.finally(() => pending.delete(p));
    if (pending.size >= inflight) await Promise.race(pending);
  }
  await Promise.all(pending);
}

/** Simulator messages as wire messages under `prefix`. */
export function wire(messages: readonly SimMessage[], prefix: string): { topic: string; payload: string }[] {
  return messages.map((m) => ({ topic: withPrefix(m.topic, prefix), payload: JSON.stringify(m.payload) }));
}
