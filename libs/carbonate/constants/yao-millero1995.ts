// Yao W. & Millero F.J. (1995), Environ. Sci. 2, 101-135, as compiled by Millero (1995), Geochim. Cosmochim.
// Acta 59, 661-677: phosphoric acid and silicic acid constants on the seawater scale. Used only when
// phosphate or silicate are given (docs/methods/carbonate.md 3.1 omits them by default).

import type { FitTerms } from './terms.js';
import { ionicStrength } from './dickson1990.js';

export interface PhosphateConstants {
  kp1: number;
  kp2: number;
  kp3: number;
}

/**
 * KP1, KP2, KP3 (mol kg-1, seawater scale), written into `out`. Valid t 0-40 degC, S 0-40 (Millero 1995).
 * Check value: equal PyCO2SYS 1.8.3.4 (kH3PO4_SWS_YM95) through the nutrient block of the reference vectors.
 */
export function kpYaoMillero1995Sws(
  { salinity: s, sqrtS, tempK, lnT }: FitTerms,
  out: PhosphateConstants,
): void {
  out.kp1 = Math.exp(
    -4576.752 / tempK +
      115.54 -
      18.453 * lnT +
      (-106.736 / tempK + 0.69171) * sqrtS +
      (-0.65643 / tempK - 0.01844) * s,
  );
  out.kp2 = Math.exp(
    -8814.715 / tempK +
      172.1033 -
      27.927 * lnT +
      (-160.34 / tempK + 1.3566) * sqrtS +
      (0.37335 / tempK - 0.05778) * s,
  );
  out.kp3 = Math.exp(
    -3070.75 / tempK - 18.126 + (17.27039 / tempK + 2.81197) * sqrtS + (-44.99486 / tempK - 0.09984) * s,
  );
}

/** KSi of Si(OH)4 (mol kg-SW-1, seawater scale). Valid t 0-40 degC, S 0-40. */
export function ksiYaoMillero1995Sws({ salinity: s, tempK, lnT }: FitTerms): number {
  const i = ionicStrength(s);
  return (
    Math.exp(
      -8904.2 / tempK +
        117.4 -
        19.334 * lnT +
        (-458.79 / tempK + 3.5913) * Math.sqrt(i) +
        (188.74 / tempK - 1.5998) * i +
        (-12.1652 / tempK + 0.07871) * i * i,
    ) *
    (1 - 0.001005 * s)
  );
}
