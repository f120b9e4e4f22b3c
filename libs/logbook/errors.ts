// Error catalogue of libs/logbook: every code this package returns, with what to do about it.
export const LOGBOOK_ERRORS = Object.freeze({
  REEFD_LOGBOOK_INVALID:
    'the logbook file has problems; each is given with its path (entry number and key): fix them and re-run',
});
export type LogbookErrorCode = keyof typeof LOGBOOK_ERRORS;
