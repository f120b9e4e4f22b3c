// Error catalogue of services/notifiers (and `reefd alerts`): every code, whether a retry can help, what to do.
import { defineErrors } from '../../libs/contract/errors.js';

export const NOTIFY_ERRORS = defineErrors('services/notifiers', {
  REEFD_NOTIFY_WEBHOOK_UNREACHABLE: {
    text: 'the webhook could not be reached (network, DNS, time-out); the outbox retries it',
    retriable: true,
  },
  REEFD_NOTIFY_WEBHOOK_STATUS: 'retriable for 5xx/408/429; otherwise check the URL and the receiver',
  REEFD_NOTIFY_SMTP: 'retriable unless the server answered 5xx (bad address, refused sender)',
  REEFD_NOTIFY_MQTT_OFFLINE: {
    text: 'the broker connection is down; the outbox retries it',
    retriable: true,
  },
  REEFD_NOTIFY_MQTT_PUBLISH: {
    text: 'the broker did not accept the publish; the outbox retries it',
    retriable: true,
  },
  REEFD_NOTIFY_NO_MQTT:
    'an mqtt channel is configured but the daemon has no MQTT client for it: add sources.mqtt or drop the channel',
  REEFD_NOTIFY_DUPLICATE_CHANNEL: 'two channels share an id; give each channel its own id',
  REEFD_NOTIFY_NOT_STARTED: 'enqueue() or ack() before start() (a programming error in the caller)',
  REEFD_NOTIFY_JOURNAL_CLOSED: 'a journal write after stop() (a programming error in the caller)',
  REEFD_NOTIFY_EMPTY_GROUP: 'internal: a message without alerts (a programming error in the caller)',
  REEFD_NOTIFY_UNKNOWN_ALERT: 'no alert with that id: list them with reefd alerts list',
  REEFD_NOTIFY_AMBIGUOUS_ID: 'an id prefix matches several alerts: give more of the id',
  REEFD_NOTIFY_ALERT_CLEARED: 'the alert has cleared: only a raised alert can be acknowledged',
});
export type NotifyErrorCode = (typeof NOTIFY_ERRORS.codes)[number];
