// Error catalogue of the currents library: stable codes, the short reason carried in results, the
// QARTOD flag of the missing value (docs/methods/qc.md 7.4: 9 when a required input is missing, 4 when the
// data fail) and a message template saying what is wrong and how to fix it.
import type { CurrentFail } from './types.js';

export const CURRENT_ERRORS = Object.freeze({
  REEFD_CURRENTS_SHAPE: {
    reason: 'shape',
    flag: 4,
    hint: 'send vel_m_s as bins x 4 and corr_pct/echo with the same shape; blank_m >= 0, bin_m > 0',
  },
  REEFD_CURRENTS_NO_ATTITUDE: {
    reason: 'no_attitude',
    flag: 9,
    hint: 'beam and inst coordinates need heading_deg, pitch_deg and roll_deg in the message',
  },
  REEFD_CURRENTS_NO_DEPTH: {
    reason: 'no_depth',
    flag: 9,
    hint: 'give the station depth from its pressure sensor, or send pres_dbar with the ensemble',
  },
  REEFD_CURRENTS_HEAD_DRY: {
    reason: 'head_dry',
    flag: 4,
    hint: 'the water depth is not above the head: check height_m, the depth source and p_atm',
  },
  REEFD_CURRENTS_TILT: {
    reason: 'tilt',
    flag: 4,
    hint: 'the frame has fallen over or the tilt sensor is faulty: inspect the mooring',
  },
  REEFD_CURRENTS_TOO_FEW_BINS: {
    reason: 'too_few_bins',
    flag: 4,
    hint: 'the depth average needs >= 2 valid bins covering >= 40 % of the depth: check QC thresholds, blank and bin size',
  },
  REEFD_CURRENTS_CONFIG: {
    reason: 'config',
    flag: 4,
    hint: 'check height_m > 0, beam_angle_deg in (0, 60) and that the beam map is a permutation of 0-3',
  },
} as const);

export type CurrentErrorCode = keyof typeof CURRENT_ERRORS;

export function currentFail(code: CurrentErrorCode, what: string): CurrentFail {
  const e = CURRENT_ERRORS[code];
  return { ok: false, flag: e.flag, code, reason: e.reason, message: `${code}: ${what}; ${e.hint}` };
}
