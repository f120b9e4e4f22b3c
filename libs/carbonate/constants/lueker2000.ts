// Lueker T.J., Dickson A.G. & Keeling C.D. (2000), Mar. Chem. 70, 105-119: K1, K2 of carbonic acid on the
// total pH scale, refit of the Mehrbach et al. (1973) measurements.

import type { FitTerms } from './terms.js';
import { exp10 } from './terms.js';

/**
 * K1 (mol kg-1, total scale). Valid t 2-35 degC, S 19-43.
 * Check value: log10 K1 = -5.8472 at S 35, t 25 degC (Dickson, Sabine & Christian 2007, ch. 5).
 */
export function k1Lueker2000({ salinity: s, tempK, lnT }: FitTerms): number {
  return exp10(-(3633.86 / tempK - 61.2172 + 9.6777 * lnT - 0.011555 * s + 0.0001152 * s * s));
}

/**
 * K2 (mol kg-1, total scale). Valid t 2-35 degC, S 19-43.
 * Check value: log10 K2 = -8.9660 at S 35, t 25 degC (Dickson, Sabine & Christian 2007, ch. 5).
 */
export function k2Lueker2000({ salinity: s, tempK, lnT }: FitTerms): number {
  return exp10(-(471.78 / tempK + 25.929 - 3.16967 * lnT - 0.01781 * s + 0.0001122 * s * s));
}
