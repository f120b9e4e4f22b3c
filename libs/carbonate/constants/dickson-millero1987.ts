// Dickson A.G. & Millero F.J. (1987), Deep-Sea Res. 34, 1733-1743: refit of the Mehrbach et al. (1973)
// K1, K2 of carbonic acid, on the seawater pH scale (SWS).

/**
 * K1 (mol kg-1, seawater scale). Valid t 2-35 degC, S 20-40.
 * Check value: pK1 = 5.8563 (SWS) at S 35, t 25 degC (evaluated from the fit; compared with PyCO2SYS 1.8.3.4
 * opt_k_carbonic 4 in test/reference/carbonate.test.ts).
 */
export function k1DicksonMillero1987Sws(salinity: number, tempK: number): number {
  const pK1 =
    3670.7 / tempK - 62.008 + 9.7944 * Math.log(tempK) - 0.0118 * salinity + 0.000116 * salinity * salinity;
  return Math.pow(10, -pK1);
}

/** K2 (mol kg-1, seawater scale). Valid t 2-35 degC, S 20-40. */
export function k2DicksonMillero1987Sws(salinity: number, tempK: number): number {
  const pK2 = 1394.7 / tempK + 4.777 - 0.0184 * salinity + 0.000118 * salinity * salinity;
  return Math.pow(10, -pK2);
}
