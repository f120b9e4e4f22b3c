// Error catalogue of libs/alerts: every code this package throws, with what to do about it.
import { defineErrors } from '../contract/errors.js';

export const ALERTS_ERRORS = defineErrors('libs/alerts', {
  REEFD_ALERTS_BAD_CONFIG: 'the alerts: section does not match the schema: fix the key named in the message',
  REEFD_ALERTS_BAD_SNAPSHOT: 'a saved alert state is of another version or site: delete it to start afresh',
});
export type AlertsErrorCode = (typeof ALERTS_ERRORS.codes)[number];
