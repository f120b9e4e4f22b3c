// Error catalogue of the daily library: stable codes, each with what is wrong and how to fix it.
// Fits and budgets return these codes inside `{ ok: false }` results (a refused fit is data, not a crash);
// only bad options and unknown time zones are thrown, as DailyError.
import { defineErrors, errorMessage, ReefdError } from '../contract/errors.js';

export const DAILY_ERRORS = defineErrors('libs/daily', {
  REEFD_DAILY_BAD_TIMEZONE:
    'the time zone is not an IANA zone name this runtime knows; use a name such as Pacific/Majuro or UTC',
  REEFD_DAILY_BAD_OPTIONS: 'a fit or budget option is out of range; fix the value named in the message',
  REEFD_DAILY_TOO_FEW_WINDOWS:
    'too few valid windows for this fit; it needs more measured windows (check the flux validity reasons)',
  REEFD_DAILY_NO_DARK_WINDOWS:
    'too few windows in the dark to pin down respiration; the night windows are missing or invalid',
  REEFD_DAILY_LIGHT_SPREAD:
    'the windows do not span enough light to resolve the curve; a day with brighter windows is needed',
  REEFD_DAILY_IK_UNRESOLVED:
    'the fitted saturation light is at or beyond the brightest window, so Pmax and Ik trade off; not reported',
  REEFD_DAILY_NO_LIGHT_RESPONSE:
    'the fitted light response is flat or inverted (amplitude <= 0); the rates do not rise with light',
  REEFD_DAILY_OMEGA_SPREAD:
    'the windows span too narrow a range of aragonite saturation for a slope; more varied water is needed',
  REEFD_DAILY_FIT_FAILED:
    'the least-squares problem is singular or not finite; check the windows for NaN values',
});

export type DailyErrorCode = (typeof DAILY_ERRORS.codes)[number];

/** A refused fit or budget: the code, the catalogue text and what was seen. */
export interface Refusal {
  ok: false;
  code: DailyErrorCode;
  reason: string;
}

export function refuse(code: DailyErrorCode, detail: string): Refusal {
  return { ok: false, code, reason: `${detail}: ${DAILY_ERRORS.text(code)}` };
}

/** Thrown only for programming or configuration errors (bad options, unknown time zone). */
export class DailyError extends ReefdError<DailyErrorCode> {
  readonly what: string;
  constructor(code: DailyErrorCode, what: string) {
    super(code, errorMessage(code, what, DAILY_ERRORS.text(code)), { detail: { what } });
    this.name = 'DailyError';
    this.what = what;
  }
}
