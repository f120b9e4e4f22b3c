// Mucci A. (1983), Am. J. Sci. 283, 780-799: stoichiometric solubility products of calcite and aragonite.

import type { FitTerms } from './terms.js';
import { exp10 } from './terms.js';

/**
 * Ksp calcite (mol2 kg-2) at 1 atm. Valid S 5-44, t 5-40 degC.
 * Check value: log10 Ksp = -6.3693 (4.27e-7) at S 35, t 25 degC (Mucci 1983).
 */
export function kspCalciteMucci1983({ salinity: s, sqrtS, tempK, lnT }: FitTerms): number {
  return exp10(
    -171.9065 -
      0.077993 * tempK +
      2839.319 / tempK +
      71.595 * (lnT / Math.LN10) +
      (-0.77712 + 0.0028426 * tempK + 178.34 / tempK) * sqrtS -
      0.07711 * s +
      0.0041249 * sqrtS * s,
  );
}

/**
 * Ksp aragonite (mol2 kg-2) at 1 atm. Valid S 5-44, t 5-40 degC.
 * Check value: log10 Ksp = -6.1883 (6.48e-7) at S 35, t 25 degC (Mucci 1983).
 */
export function kspAragoniteMucci1983({ salinity: s, sqrtS, tempK, lnT }: FitTerms): number {
  return exp10(
    -171.945 -
      0.077993 * tempK +
      2903.293 / tempK +
      71.595 * (lnT / Math.LN10) +
      (-0.068393 + 0.0017276 * tempK + 88.135 / tempK) * sqrtS -
      0.10018 * s +
      0.0059415 * sqrtS * s,
  );
}
