// Calibration errors of simulated sensors: each sensor of a run can be given a fixed error drawn from the
// typical accuracies reefd assumes for its uncertainties (docs/methods/uncertainty.md 9.3), so replicated runs of
// one reef (the same environment, each run its own noise and its own calibrations) scatter as much as the
// stated sigmas say they should. Off unless asked for: the demo's sensors are perfectly calibrated.
import type { Rng } from './prng.js';

/** Standard deviations of the drawn errors (docs/methods/uncertainty.md 9.3, the "default in reefd" column). */
export const TYPICAL_ACCURACY = Object.freeze({
  /** pCO2: relative, 1 % of reading (at the reef's 300-600 uatm above the 2-uatm floor). */
  pco2Rel: 0.01,
  /** O2 optode: relative, 2 % of reading. */
  o2Rel: 0.02,
  /** CTD temperature, degC, and salinity (the values the inverse NEC's sigma uses). */
  tempC: 0.01,
  sal: 0.02,
  /** Depth of a pressure sensor, m. */
  depthM: 0.01,
  /** ADCP: relative gain, offset per component (m/s) and heading (deg). */
  adcpRel: 0.01,
  adcpOffsetMS: 0.005,
  headingDeg: 2,
});

/** One sensor's errors: reading = truth x (1 + gain) + offset, for the field its kind reports. */
export interface SensorCalibration {
  gain: number;
  offset: number;
  /** Second offset: CTD salinity; ADCP north offset (m/s). */
  offset2: number;
  /** ADCP heading error, deg. */
  headingDeg: number;
}

const NONE: SensorCalibration = Object.freeze({ gain: 0, offset: 0, offset2: 0, headingDeg: 0 });

/** Draws a sensor's errors from its own stream (independent of its noise). */
export function drawCalibration(kind: string, rng: Rng): SensorCalibration {
  const a = TYPICAL_ACCURACY;
  const n = () => rng.normal();
  switch (kind) {
    case 'pco2':
      return { ...NONE, gain: a.pco2Rel * n() };
    case 'oxygen':
      return { ...NONE, gain: a.o2Rel * n() };
    case 'ctd':
      return { ...NONE, offset: a.tempC * n(), offset2: a.sal * n() };
    case 'pressure':
      return { ...NONE, offset: a.depthM * n() };
    case 'adcp':
      return {
        gain: a.adcpRel * n(),
        offset: a.adcpOffsetMS * n(),
        offset2: a.adcpOffsetMS * n(),
        headingDeg: a.headingDeg * n(),
      };
    default:
      return NONE;
  }
}

/** The current an ADCP with these errors measures, earth frame (m/s). */
export function measuredCurrent(cal: SensorCalibration, eastMS: number, northMS: number): [number, number] {
  const h = (cal.headingDeg * Math.PI) / 180;
  const g = 1 + cal.gain;
  // A heading error turns the measured vector by h (towards the east for h > 0).
  const e = g * (eastMS * Math.cos(h) + northMS * Math.sin(h)) + cal.offset;
  const nn = g * (-eastMS * Math.sin(h) + northMS * Math.cos(h)) + cal.offset2;
  return [e, nn];
}
