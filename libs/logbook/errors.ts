// Error catalogue of libs/logbook: every code this package returns, with what to do about it.
import { defineErrors } from '../contract/errors.js';

export const LOGBOOK_ERRORS = defineErrors('libs/logbook', {
  REEFD_LOGBOOK_INVALID:
    'the logbook file has problems; each is given with its path (entry number and key): fix them and re-run',
});
export type LogbookErrorCode = (typeof LOGBOOK_ERRORS.codes)[number];
