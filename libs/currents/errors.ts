// Error catalogue of the currents library: stable codes, each with a hint saying what is wrong and how to fix
// it. The codes an ensemble can fail with also carry the short reason put in results and the QARTOD flag of
// the missing value (docs/methods/qc.md 7.4: 9 when a required input is missing, 4 when the data fail).
import { defineErrors } from '../contract/errors.js';
import type { CurrentFail } from './types.js';

export const CURRENT_ERRORS = defineErrors('libs/currents', {
  REEFD_CURRENTS_SHAPE:
    'send vel_m_s as bins x 4 and corr_pct/echo with the same shape; blank_m >= 0, bin_m > 0',
  REEFD_CURRENTS_NO_ATTITUDE:
    'beam and inst coordinates need heading_deg, pitch_deg and roll_deg in the message',
  REEFD_CURRENTS_NO_DEPTH:
    'give the station depth from its pressure sensor, or send pres_dbar with the ensemble',
  REEFD_CURRENTS_HEAD_DRY:
    'the water depth is not above the head: check height_m, the depth source and p_atm',
  REEFD_CURRENTS_TILT: 'the frame has fallen over or the tilt sensor is faulty: inspect the mooring',
  REEFD_CURRENTS_TOO_FEW_BINS:
    'the depth average needs >= 2 valid bins covering >= 40 % of the depth: check QC thresholds, blank and bin size',
  REEFD_CURRENTS_CONFIG:
    'check height_m > 0, beam_angle_deg in (0, 60) and that the beam map is a permutation of 0-3',
  REEFD_CURRENTS_BEAM_ANGLE:
    "the beam angle is outside (0, 60) deg: set beam_angle_deg to the head's value (usually 20, 25 or 30)",
});

export type CurrentErrorCode = (typeof CURRENT_ERRORS.codes)[number];

/** The codes an ensemble fails with, their result reason and the flag of the missing value. */
export const CURRENT_FAILS = Object.freeze({
  REEFD_CURRENTS_SHAPE: { reason: 'shape', flag: 4 },
  REEFD_CURRENTS_NO_ATTITUDE: { reason: 'no_attitude', flag: 9 },
  REEFD_CURRENTS_NO_DEPTH: { reason: 'no_depth', flag: 9 },
  REEFD_CURRENTS_HEAD_DRY: { reason: 'head_dry', flag: 4 },
  REEFD_CURRENTS_TILT: { reason: 'tilt', flag: 4 },
  REEFD_CURRENTS_TOO_FEW_BINS: { reason: 'too_few_bins', flag: 4 },
  REEFD_CURRENTS_CONFIG: { reason: 'config', flag: 4 },
} as const satisfies Partial<Record<CurrentErrorCode, { reason: string; flag: 4 | 9 }>>);

export type CurrentFailCode = keyof typeof CURRENT_FAILS;

export function currentFail(code: CurrentFailCode, what: string): CurrentFail {
  const e = CURRENT_FAILS[code];
  return {
    ok: false,
    flag: e.flag,
    code,
    reason: e.reason,
    message: `${code}: ${what}; ${CURRENT_ERRORS.text(code)}`,
  };
}
