// Multi-variate and cross-sensor checks (docs/methods/qc.md 7.2 test 9; docs/methods/currents.md 5.4; QARTOD
// "multi-variate" and "neighbor" tests). Each takes plain numbers and returns a flag plus the number it
// judged, so a caller can explain it. Engineering defaults, not published values, unless a source is named.

import type { QcFlag } from './flags.js';

export interface CheckResult {
  readonly flag: QcFlag;
  /** The quantity compared with the limit (unit in the function's doc). */
  readonly value: number;
}

const missing = (...xs: number[]): boolean => xs.some((x) => !Number.isFinite(x));

/**
 * ADCP total tilt acos(cos(pitch) cos(roll)) in degrees (docs/methods/currents.md 5.4): above suspectDeg (10) gives 3, above
 * failDeg (20) gives 4 - the frame has fallen over or is sinking into the sand. Check: pitch 3, roll 4 deg gives
 * 4.9981 deg (algebra: acos(cos 3 deg x cos 4 deg)).
 */
export function adcpTilt(pitchDeg: number, rollDeg: number, suspectDeg = 10, failDeg = 20): CheckResult {
  if (missing(pitchDeg, rollDeg)) return { flag: 9, value: Number.NaN };
  const r = Math.PI / 180;
  const c = Math.min(1, Math.max(-1, Math.cos(pitchDeg * r) * Math.cos(rollDeg * r)));
  const tiltDeg = Math.acos(c) / r;
  return { flag: tiltDeg > failDeg ? 4 : tiltDeg > suspectDeg ? 3 : 1, value: tiltDeg };
}

/**
 * Sensor exposure: the water column above a bottom-mounted sensor, waterDepthM (total depth h, m, surface above
 * the bed) minus sensorHeightM (m above the bed). At or below 0 the sensor is out of the water: 4 (its readings
 * are air values). Below marginM (default 0.05 m) it is awash: 3. `value` is the water above the sensor, m.
 */
export function sensorExposed(waterDepthM: number, sensorHeightM: number, marginM = 0.05): CheckResult {
  if (missing(waterDepthM, sensorHeightM)) return { flag: 9, value: Number.NaN };
  const aboveM = waterDepthM - sensorHeightM;
  return { flag: aboveM <= 0 ? 4 : aboveM < marginM ? 3 : 1, value: aboveM };
}

/**
 * Oxygen saturation above maxPct (default 200 %) is taken as an optode fault (fouling, a bubble on the foil, a
 * bad calibration), not as photosynthesis: 4. Engineering default.
 */
export function o2SaturationFault(o2SatPct: number, maxPct = 200): CheckResult {
  if (missing(o2SatPct)) return { flag: 9, value: Number.NaN };
  return { flag: o2SatPct > maxPct ? 4 : 1, value: o2SatPct };
}

/**
 * pCO2 below minUatm (default 100 uatm) in reef water is taken as a sensor fault (zero drift, a dry membrane): 4.
 * Stricter than the suspect user range of docs/methods/qc.md 7.3 (< 100 gives 3) on purpose: the user range judges the
 * value, this check judges the sensor, and the alert engine raises a fault on it. Engineering default.
 */
export function pco2LowFault(pco2Uatm: number, minUatm = 100): CheckResult {
  if (missing(pco2Uatm)) return { flag: 9, value: Number.NaN };
  return { flag: pco2Uatm < minUatm ? 4 : 1, value: pco2Uatm };
}

/**
 * Temperatures of co-located sensors (CTD, optode, pCO2; degC) differing by more than maxDiffC (0.5 degC,
 * docs/methods/qc.md 7.2) give 3. `value` is the largest pairwise difference. Fewer than two finite values give 2.
 */
export function temperatureAgreement(tempsC: readonly number[], maxDiffC = 0.5): CheckResult {
  const xs = tempsC.filter((x) => Number.isFinite(x));
  if (xs.length < 2) return { flag: 2, value: Number.NaN };
  const spread = Math.max(...xs) - Math.min(...xs);
  return { flag: spread > maxDiffC ? 3 : 1, value: spread };
}

/** Logger and ADCP depths (m, after offsets) differing by more than maxDiffM (0.05 m, docs/methods/qc.md 7.2) give 3. */
export function depthAgreement(depthAM: number, depthBM: number, maxDiffM = 0.05): CheckResult {
  if (missing(depthAM, depthBM)) return { flag: 2, value: Number.NaN };
  const d = Math.abs(depthAM - depthBM);
  return { flag: d > maxDiffM ? 3 : 1, value: d };
}

/**
 * Neighbour test: a difference between two stations' values larger than nSd (5, docs/methods/qc.md 7.2) times the 25-h
 * sd of that difference gives 3. `value` is |difference| / sd. Unknown or zero sd gives 2.
 */
export function neighbourDifference(difference: number, sd25h: number, nSd = 5): CheckResult {
  if (missing(difference, sd25h) || sd25h <= 0) return { flag: 2, value: Number.NaN };
  const z = Math.abs(difference) / sd25h;
  return { flag: z > nSd ? 3 : 1, value: z };
}

/**
 * Bubbles in the conductivity cell: a salinity spike (spike flag 3 or 4) with temperature steady within
 * quietC (default 0.05 degC) between the same samples gives 3. `value` is the temperature change, degC.
 */
export function salinityBubble(salSpikeFlag: QcFlag, tempChangeC: number, quietC = 0.05): CheckResult {
  if (missing(tempChangeC)) return { flag: 2, value: Number.NaN };
  const d = Math.abs(tempChangeC);
  return { flag: (salSpikeFlag === 3 || salSpikeFlag === 4) && d <= quietC ? 3 : 1, value: d };
}
