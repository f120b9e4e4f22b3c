// Error catalogue of the metabolism library: stable codes, each with what is wrong and how to fix it.
// Hot paths return these codes inside `{ ok: false }` results instead of throwing.
import { defineErrors, errorMessage, ReefdError } from '../contract/errors.js';

export const METABOLISM_ERRORS = defineErrors('libs/metabolism', {
  REEFD_METABOLISM_NO_BRACKET:
    'the function has the same sign at both ends of the bracket; widen the bracket or check the inputs',
  REEFD_METABOLISM_NO_CONVERGENCE:
    'the root finder did not converge within the iteration limit; raise maxIter',
  REEFD_METABOLISM_BAD_FUNCTION_VALUE:
    'the function returned NaN inside the bracket; make it finite (or +-Infinity) over the bracket',
  REEFD_METABOLISM_NEC_NO_ROOT:
    'no calcification rate in the bracket reproduces the downstream pCO2; check the pCO2 inter-calibration, PQ and the O2 gradient',
  REEFD_METABOLISM_CARBONATE_FAILED:
    'the carbonate system could not be solved for a station; check TA, pCO2, temperature and salinity of that station',
  REEFD_METABOLISM_BAD_PARAMS: 'a transect parameter is out of range; fix the transect configuration',
});

export type MetabolismErrorCode = (typeof METABOLISM_ERRORS.codes)[number];

/** Thrown only for programming or configuration errors (never on the per-window hot path). */
export class MetabolismError extends ReefdError<MetabolismErrorCode> {
  readonly what: string;
  constructor(code: MetabolismErrorCode, what: string) {
    super(code, errorMessage(code, what, METABOLISM_ERRORS.text(code)), { detail: { what } });
    this.name = 'MetabolismError';
    this.what = what;
  }
}
