// Error catalogue of services/archive (the raw archive writer and reader; REEFD_DISK_FULL and
// REEFD_INPUT_MISSING are the core catalogue's).
import { defineErrors } from '../../libs/contract/errors.js';

export const ARCHIVE_ERRORS = defineErrors('services/archive', {
  REEFD_ARCHIVE_CLOSED: 'a line was appended after the archive closed (a programming error in the caller)',
});
export type ArchiveErrorCode = (typeof ARCHIVE_ERRORS.codes)[number];
