// Dickson A.G. (1990a), Deep-Sea Res. 37, 755-766: KB of boric acid on the total scale.
// Dickson A.G. (1990b), J. Chem. Thermodyn. 22, 113-127: KS of bisulfate on the free scale.

import type { FitTerms } from './terms.js';

/**
 * KB (mol kg-1, total scale). Valid t 0-45 degC, S 5-45.
 * Check value: ln KB = -19.7964 at S 35, t 25 degC (Dickson, Sabine & Christian 2007, ch. 5).
 */
export function kbDickson1990({ salinity: s, sqrtS, tempK, lnT }: FitTerms): number {
  const top = -8966.9 - 2890.53 * sqrtS - 77.942 * s + 1.728 * sqrtS * s - 0.0996 * s * s;
  return Math.exp(
    top / tempK +
      148.0248 +
      137.1942 * sqrtS +
      1.62142 * s -
      (24.4344 + 25.085 * sqrtS + 0.2474 * s) * lnT +
      0.053105 * sqrtS * tempK,
  );
}

/** Ionic strength (mol kg-H2O-1) from practical salinity, as used by Dickson (1990b). */
export function ionicStrength(salinity: number): number {
  return (19.924 * salinity) / (1000 - 1.005 * salinity);
}

/**
 * KS = [H+]F[SO4--]/[HSO4-] (mol kg-SW-1, free scale), including the kg-H2O to kg-SW factor.
 * Valid t 0-45 degC, S 5-45. Check value: ln KS = -2.30 at S 35, t 25 degC
 * (Dickson, Sabine & Christian 2007, ch. 5).
 */
export function ksDickson1990({ salinity: s, tempK, lnT }: FitTerms): number {
  const i = ionicStrength(s);
  const i05 = Math.sqrt(i);
  const lnKs =
    -4276.1 / tempK +
    141.328 -
    23.093 * lnT +
    (-13856 / tempK + 324.57 - 47.986 * lnT) * i05 +
    (35474 / tempK - 771.54 + 114.723 * lnT) * i -
    (2698 / tempK) * i05 * i +
    (1776 / tempK) * i * i;
  return Math.exp(lnKs) * (1 - 0.001005 * s);
}
