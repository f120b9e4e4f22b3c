// Weiss R.F. (1974), Mar. Chem. 2, 203-215: CO2 solubility K0 and the virial coefficients of CO2 in air.

/**
 * K0 = [CO2*]/fCO2 in mol kg-1 atm-1 (Weiss 1974, eq. 12 with the mol/kg coefficients).
 * Valid t -1 to 40 degC, S 0 to 40. Check value: ln K0 = -3.5617 at S 35, t 25 degC
 * (Dickson, Sabine & Christian 2007, Guide to Best Practices, ch. 5).
 */
export function k0Weiss1974(salinity: number, tempK: number, lnT = Math.log(tempK)): number {
  const t100 = tempK / 100;
  return Math.exp(
    -60.2409 +
      93.4517 / t100 +
      23.3585 * (lnT - Math.LN10 * 2) +
      salinity * (0.023517 - 0.023656 * t100 + 0.0047036 * t100 * t100),
  );
}

/** Second virial coefficient B of CO2, cm3 mol-1 (Weiss 1974, eq. 6); T 265-320 K. */
export function virialBWeiss1974(tempK: number): number {
  return -1636.75 + 12.0408 * tempK - 3.27957e-2 * tempK * tempK + 3.16528e-5 * tempK * tempK * tempK;
}

/** Cross virial coefficient delta(CO2-air), cm3 mol-1 (Weiss 1974, eq. 7). */
export function virialDeltaWeiss1974(tempK: number): number {
  return 57.7 - 0.118 * tempK;
}
