// Public API of services/notifiers: the durable alert outbox and its channels.
export {
  createNotifier,
  type Notifier,
  type NotifierOptions,
  type NotifierStatus,
  type AckResult,
  type AckEvent,
  type Clock,
  type Timers,
} from './notifier.js';
export type { Channel } from './channels/types.js';
export {
  createWebhookChannel,
  webhookSignature,
  SIGNATURE_HEADER,
  TIMESTAMP_HEADER,
  type WebhookOptions,
} from './channels/webhook.js';
export { createSmtpChannel, type SmtpOptions } from './channels/smtp.js';
export { createMqttChannel, type MqttPublisher, type MqttChannelOptions } from './channels/mqtt.js';
export { createDashboardChannel } from './channels/dashboard.js';
export { channelsFromConfig, notifierOptionsFromConfig } from './from-config.js';
export { NotifyError, isRetriable, nextRetryDelayMs, type RetryPolicy } from './retry.js';
export type { NotificationMessage, MessageKind } from './messages.js';
export {
  alertsStateDir,
  loadOutboxState,
  appendAck,
  type Episode,
  type OutboxState,
  type AckRecord,
  type EpisodeAck,
} from './outbox-state.js';
export { watchAcks, type AckWatch } from './ack-watch.js';
export { NOTIFY_ERRORS, type NotifyErrorCode } from './errors.js';
