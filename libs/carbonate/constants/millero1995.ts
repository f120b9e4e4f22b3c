// Millero F.J. (1995), Geochim. Cosmochim. Acta 59, 661-677: KW of water (eq. 63).

import type { FitTerms } from './terms.js';

/**
 * KW (mol2 kg-2) in the form of Dickson, Sabine & Christian (2007, ch. 5), which treats it as total scale.
 * Check value: ln KW = -30.434 at S 35, t 25 degC (Dickson, Sabine & Christian 2007, ch. 5).
 * Valid t 0-45 degC, S 0-45.
 */
export function kwMillero1995Total({ salinity: s, sqrtS, tempK, lnT }: FitTerms): number {
  return Math.exp(
    148.9652 -
      13847.26 / tempK -
      23.6521 * lnT +
      (118.67 / tempK - 5.977 + 1.0495 * lnT) * sqrtS -
      0.01615 * s,
  );
}

/**
 * KW (mol2 kg-2) on the seawater scale, Millero's (1995) own constant term 148.9802. This is the form
 * PyCO2SYS 1.8.3.4 uses (kH2O_SWS_M95); it sits 1.5 % above the total-scale form before the scale change.
 */
export function kwMillero1995Sws({ salinity: s, sqrtS, tempK, lnT }: FitTerms): number {
  return Math.exp(
    148.9802 -
      13847.26 / tempK -
      23.6521 * lnT +
      (118.67 / tempK - 5.977 + 1.0495 * lnT) * sqrtS -
      0.01615 * s,
  );
}
