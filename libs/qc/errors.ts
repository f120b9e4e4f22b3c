// Error catalogue of libs/qc: every code this package throws, with what to do about it.
export const QC_ERRORS = Object.freeze({
  REEFD_QC_UNKNOWN_VARIABLE:
    'a QC state was asked for a variable without default limits: give sensor limits or use a known name',
  REEFD_QC_BAD_WINDOW: 'a QC window was not positive or had no bins: fix the window length in the QC limits',
});
export type QcErrorCode = keyof typeof QC_ERRORS;
