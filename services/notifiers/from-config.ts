// Builds channels and notifier options from the parsed `notify:` section (libs/alerts notifyConfigSchema).

import type { NotifyConfig } from '../../libs/alerts/index.js';
import type { Channel } from './channels/types.js';
import { createDashboardChannel } from './channels/dashboard.js';
import { createMqttChannel, type MqttPublisher } from './channels/mqtt.js';
import { createSmtpChannel } from './channels/smtp.js';
import { createWebhookChannel } from './channels/webhook.js';
import type { NotificationMessage } from './messages.js';
import type { NotifierOptions } from './notifier.js';
import { resolveSecret } from '../config/load.js';
import { NOTIFY_ERRORS } from './errors.js';

export interface ChannelDeps {
  readonly site: string;
  readonly env: Readonly<Record<string, string | undefined>>;
  /** Needed when an mqtt channel is configured. */
  readonly mqtt?: MqttPublisher;
  /** Needed when a dashboard channel is configured. */
  readonly dashboard?: (m: NotificationMessage) => void;
  /** Folder that relative secret file paths are relative to (the configuration's). */
  readonly baseDir?: string;
}

export async function channelsFromConfig(cfg: NotifyConfig, deps: ChannelDeps): Promise<Channel[]> {
  const out: Channel[] = [];
  for (const [id, c] of Object.entries(cfg.channels)) {
    if (!c.enabled) continue;
    const common = {
      minSeverity: c.min_severity,
      ...(c.rate_limit
        ? { rateLimit: { maxMessages: c.rate_limit.max_messages, perMs: c.rate_limit.per_min * 60_000 } }
        : {}),
    };
    let ch: Channel;
    switch (c.type) {
      case 'webhook': {
        const secret = c.secret ? await resolveSecret(c.secret, deps.env, deps.baseDir) : undefined;
        ch = createWebhookChannel({
          id,
          url: c.url,
          site: deps.site,
          timeoutMs: c.timeout_s * 1000,
          ...(secret ? { secret } : {}),
        });
        break;
      }
      case 'smtp': {
        const pass = c.auth ? await resolveSecret(c.auth.pass, deps.env, deps.baseDir) : undefined;
        ch = createSmtpChannel({
          id,
          host: c.host,
          port: c.port,
          secure: c.secure,
          from: c.from,
          to: c.to,
          timeoutMs: c.timeout_s * 1000,
          ...(c.auth && pass !== undefined ? { auth: { user: c.auth.user, pass } } : {}),
        });
        break;
      }
      case 'mqtt':
        if (!deps.mqtt)
          throw NOTIFY_ERRORS.error('REEFD_NOTIFY_NO_MQTT', `channel ${id}`, { detail: { channel: id } });
        ch = createMqttChannel({
          id,
          client: deps.mqtt,
          topic: c.topic,
          qos: c.qos,
          retain: c.retain,
          site: deps.site,
        });
        break;
      case 'dashboard':
        ch = createDashboardChannel(id, deps.dashboard ?? (() => undefined));
        break;
    }
    out.push({ ...ch, send: ch.send.bind(ch), ...common });
  }
  return out;
}

/** The timing options of createNotifier from the config (the caller adds dir, site, channels, clock). */
export function notifierOptionsFromConfig(
  cfg: NotifyConfig,
): Pick<NotifierOptions, 'groupWindowMs' | 'renotifyMs' | 'digestThreshold' | 'rateLimit' | 'retry'> {
  return {
    groupWindowMs: cfg.group_window_s * 1000,
    renotifyMs: cfg.renotify_min * 60_000,
    digestThreshold: cfg.digest_threshold,
    rateLimit: { maxMessages: cfg.rate_limit.max_messages, perMs: cfg.rate_limit.per_min * 60_000 },
    retry: { baseMs: cfg.retry.base_s * 1000, maxMs: cfg.retry.max_s * 1000 },
  };
}
