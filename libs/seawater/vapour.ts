// Weiss R.F. & Price B.A. (1980), Mar. Chem. 8, 347-359: water vapour pressure over seawater.

/**
 * Saturation water vapour pressure over seawater, atm. Valid t 0-40 degC, S 0-40.
 * ln(pw) = 24.4543 - 67.4509 (100/T) - 4.8489 ln(T/100) - 0.000544 S.
 * Check value: 0.030655 atm at S 35, t 25 degC (evaluated; PyCO2SYS 1.8.3.4 vpfactor agrees to 1e-12,
 * test/reference/seawater.test.ts).
 */
export function vapourPressureAtm(salinity: number, tempC: number): number {
  const tempK = tempC + 273.15;
  return Math.exp(24.4543 - 67.4509 * (100 / tempK) - 4.8489 * Math.log(tempK / 100) - 0.000544 * salinity);
}
