// Error catalogue of libs/waves: the codes a burst analysis returns in `{ ok: false }` results (with the
// QARTOD flag there) and the three domain errors the numerical helpers throw on arguments they cannot take.
import { defineErrors } from '../contract/errors.js';
import type { WavesErrorCode } from './types.js';

export const WAVES_ERRORS = defineErrors('libs/waves', {
  REEFD_WAVES_EMPTY: 'the burst has no samples; check the pressure sensor logger and its burst settings',
  REEFD_WAVES_BAD_INPUT:
    'a burst input is missing or invalid (fs_hz, p_atm, density, gravity, sensor height or nperseg); fix the sensor configuration',
  REEFD_WAVES_TOO_SHORT: 'a burst needs at least 16 samples; lengthen the burst in the logger settings',
  REEFD_WAVES_NONFINITE: 'more than 5 % of the samples are not finite; check the sensor and its cable',
  REEFD_WAVES_DRY:
    'the sensor is out of the water (mean head under the dry margin); check the tide and height_m',
  REEFD_WAVES_FLAT:
    'the detrended record is flat or clipped (sd under 2 mm); check the sensor range, fouling and the logger',
  REEFD_WAVES_SPIKY: 'more than 5 % of the samples are spikes; check the sensor and its cable',
  REEFD_WAVES_LENGTH_MISMATCH:
    'the pressure and velocity channels of a PUV burst differ in length; send them aligned',
  REEFD_WAVES_NO_BAND:
    'there is no wave energy in the sea-swell band; a calm burst or a cutoff below the band',
  REEFD_WAVES_CHI2_DOMAIN: 'chi2Quantile takes 0 < p < 1 and nu > 0 (a programming error in the caller)',
  REEFD_WAVES_DISPERSION_DOMAIN:
    'solveDispersion takes omega >= 0, depth > 0 and g > 0, all finite (a programming error in the caller)',
  REEFD_WAVES_WELCH_SIZE:
    'welchPsd takes fs > 0 and a power-of-two segment length in [8, N] (a programming error in the caller)',
});

// Every code a waves result can carry is in the catalogue (a compile error names one that is not).
type Uncatalogued = Exclude<WavesErrorCode, (typeof WAVES_ERRORS.codes)[number]>;
const _allCatalogued: [Uncatalogued] extends [never] ? true : Uncatalogued = true;
