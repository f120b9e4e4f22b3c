// Error catalogue of services/records (the durable record history behind /api/records).
import { defineErrors } from '../../libs/contract/errors.js';

export const RECORDS_ERRORS = defineErrors('services/records', {
  REEFD_RECORDS_BAD_QUERY:
    'the record query is not valid (limit or cursor); fix the parameter the message names',
});
export type RecordsErrorCode = (typeof RECORDS_ERRORS.codes)[number];
