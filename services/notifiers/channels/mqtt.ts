// MQTT channel: the message as JSON on a topic, through an mqtt.js client owned by the caller.

import { NotifyError } from '../retry.js';
import type { Channel } from './types.js';
import type { NotificationMessage } from '../messages.js';

/** The part of an mqtt.js MqttClient this channel uses. */
export interface MqttPublisher {
  readonly connected: boolean;
  publishAsync(topic: string, message: string, opts: { qos: 0 | 1 | 2; retain: boolean }): Promise<unknown>;
}

export interface MqttChannelOptions {
  readonly id: string;
  readonly client: MqttPublisher;
  readonly topic: string;
  readonly qos?: 0 | 1 | 2;
  readonly retain?: boolean;
  readonly site: string;
  readonly minSeverity?: Channel['minSeverity'];
}

export function createMqttChannel(o: MqttChannelOptions): Channel {
  return {
    id: o.id,
    ...(o.minSeverity ? { minSeverity: o.minSeverity } : {}),
    async send(m: NotificationMessage) {
      // While disconnected, mqtt.js would queue in memory; the outbox is the durable queue, so fail and retry.
      if (!o.client.connected) {
        throw new NotifyError(
          'REEFD_NOTIFY_MQTT_OFFLINE',
          `broker not connected; will retry ${o.topic}`,
          true,
        );
      }
      const payload = JSON.stringify({
        type: 'reefd.notification',
        site: o.site,
        kind: m.kind,
        subject: m.subject,
        alerts: m.alerts,
      });
      try {
        await o.client.publishAsync(o.topic, payload, { qos: o.qos ?? 1, retain: o.retain ?? false });
      } catch (err) {
        throw new NotifyError(
          'REEFD_NOTIFY_MQTT_PUBLISH',
          `publish to ${o.topic} failed: ${(err as Error).message}`,
          true,
          {
            cause: err,
          },
        );
      }
    },
  };
}
