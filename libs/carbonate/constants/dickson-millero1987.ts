// Dickson A.G. & Millero F.J. (1987), Deep-Sea Res. 34, 1733-1743: refit of the Mehrbach et al. (1973)
// K1, K2 of carbonic acid, on the seawater pH scale (SWS).

import type { FitTerms } from './terms.js';
import { exp10 } from './terms.js';

/**
 * K1 (mol kg-1, seawater scale). Valid t 2-35 degC, S 20-40.
 * Check value: equals PyCO2SYS 1.8.3.4 (opt_k_carbonic 4) to 1e-12 over the reference grid
 * (test/reference/carbonate.test.ts, block dm87-lee).
 */
export function k1DicksonMillero1987Sws({ salinity: s, tempK, lnT }: FitTerms): number {
  return exp10(-(3670.7 / tempK - 62.008 + 9.7944 * lnT - 0.0118 * s + 0.000116 * s * s));
}

/** K2 (mol kg-1, seawater scale). Valid t 2-35 degC, S 20-40. */
export function k2DicksonMillero1987Sws({ salinity: s, tempK }: FitTerms): number {
  return exp10(-(1394.7 / tempK + 4.777 - 0.0184 * s + 0.000118 * s * s));
}
