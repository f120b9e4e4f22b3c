// Error catalogue of libs/calibration: every code this package returns, with what to do about it.
import { defineErrors } from '../contract/errors.js';

export const CALIBRATION_ERRORS = defineErrors('libs/calibration', {
  REEFD_CALIBRATION_INVALID:
    'the calibration file has problems; each is given with its path (entry number and key): fix them and re-run',
  REEFD_CALIBRATION_TOO_FEW:
    'too few bottle-sensor pairs for this fit: take more bottles beside the sensor, or widen --match-min',
  REEFD_CALIBRATION_SPREAD:
    'the bottles do not spread enough over time (or value) to determine this fit: take bottles through the deployment',
  REEFD_CALIBRATION_OUTLIERS:
    'more than half of the bottles disagree with the sensor: check the bottle data and the sensor pairing',
  REEFD_CALIBRATION_NO_REFERENCE:
    'a bottle gave no reference value (e.g. TA and DIC with no carbonate solution): check that bottle',
});
export type CalibrationErrorCode = (typeof CALIBRATION_ERRORS.codes)[number];
