// Perez F.F. & Fraga F. (1987), Mar. Chem. 21, 161-168: KF of hydrogen fluoride on the free scale.

import type { FitTerms } from './terms.js';

/**
 * KF = [H+]F[F-]/[HF] (mol kg-1, free scale). Valid t 9-33 degC, S 10-40.
 * Check value: ln KF = -6.09 at S 35, t 25 degC (Dickson, Sabine & Christian 2007, ch. 5 quote -6.09 for
 * their KF; this fit gives -6.0919).
 */
export function kfPerezFraga1987({ sqrtS, tempK }: FitTerms): number {
  return Math.exp(874 / tempK - 9.68 + 0.111 * sqrtS);
}
