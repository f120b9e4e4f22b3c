// Error catalogue of services/notifiers (and `reefd alerts`): every code, whether a retry can help, what to do.
export const NOTIFY_ERRORS = Object.freeze({
  REEFD_NOTIFY_WEBHOOK_UNREACHABLE: 'retriable: the webhook could not be reached (network, DNS, time-out)',
  REEFD_NOTIFY_WEBHOOK_STATUS: 'retriable for 5xx/408/429; otherwise check the URL and the receiver',
  REEFD_NOTIFY_SMTP: 'retriable unless the server answered 5xx (bad address, refused sender)',
  REEFD_NOTIFY_MQTT_OFFLINE: 'retriable: the broker connection is down',
  REEFD_NOTIFY_MQTT_PUBLISH: 'retriable: the broker did not accept the publish',
  REEFD_NOTIFY_NO_MQTT: 'an mqtt channel is configured but the daemon has no MQTT client for it',
  REEFD_NOTIFY_DUPLICATE_CHANNEL: 'two channels share an id',
  REEFD_NOTIFY_NOT_STARTED: 'enqueue() or ack() before start()',
  REEFD_NOTIFY_JOURNAL_CLOSED: 'a journal write after stop()',
  REEFD_NOTIFY_EMPTY_GROUP: 'internal: a message without alerts',
  REEFD_NOTIFY_UNKNOWN_ALERT: 'no alert with that id: list them with reefd alerts list',
  REEFD_NOTIFY_AMBIGUOUS_ID: 'an id prefix matches several alerts: give more of the id',
  REEFD_NOTIFY_ALERT_CLEARED: 'the alert has cleared: only a raised alert can be acknowledged',
});
export type NotifyErrorCode = keyof typeof NOTIFY_ERRORS;
