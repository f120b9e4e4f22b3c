// Error catalogue of libs/qc: every code this package throws, with what to do about it.
import { defineErrors } from '../contract/errors.js';

export const QC_ERRORS = defineErrors('libs/qc', {
  REEFD_QC_UNKNOWN_VARIABLE:
    'a QC state was asked for a variable without default limits: give sensor limits or use a known name',
  REEFD_QC_BAD_WINDOW: 'a QC window was not positive or had no bins: fix the window length in the QC limits',
});
export type QcErrorCode = (typeof QC_ERRORS.codes)[number];
