// Weiss R.F. (1974), Mar. Chem. 2, 203-215: fugacity of CO2 in moist air from the virial equation of state,
// fCO2 = pCO2 exp[(B + 2 (1 - x)^2 delta) P / (R T)], x = mole fraction of CO2 = pCO2/P (docs/methods/carbonate.md 3.4).
// CO2SYS and PyCO2SYS 1.8.3.4 drop the (1 - x)^2 factor (x < 0.002 here); option fugacity 'weiss1974-dilute'
// does the same, for comparison. Keeping it lowers fCO2 by about 4e-6 relative per 1000 uatm.

import { vapourPressureAtm } from '../seawater/index.js';
import type { EquilibriumConstants } from './equilibrium.js';

/** Gas constant, J mol-1 K-1 (CODATA 2018). */
const R_J = 8.314462618;
/** Standard atmosphere, hPa. */
export const STANDARD_BARO_HPA = 1013.25;

/**
 * fCO2/pCO2 at temperature T (K), total pressure baroHpa, and pCO2 (uatm) for the mole fraction term.
 * About 0.99680 at 25 degC, 1 atm, 400 uatm (Weiss 1974; common practice "0.997 at 25 degC").
 */
export function fugacityFactorAt(
  virialB: number,
  virialDelta: number,
  tempK: number,
  baroHpa: number,
  pco2Uatm: number,
  moleFractionTerm = 1,
): number {
  const pAtm = baroHpa / STANDARD_BARO_HPA;
  const x = (moleFractionTerm * pco2Uatm * 1e-6) / pAtm;
  const oneMinusX = 1 - x;
  // cm3 mol-1 * 1e-6 = m3 mol-1; P in Pa.
  return Math.exp(
    ((virialB + 2 * oneMinusX * oneMinusX * virialDelta) * 1e-6 * baroHpa * 100) / (R_J * tempK),
  );
}

/** fCO2 (uatm) from pCO2 (uatm) with the constants' temperature; baroHpa default 1013.25. */
export function fco2FromPco2(c: EquilibriumConstants, pco2Uatm: number, baroHpa = STANDARD_BARO_HPA): number {
  return (
    pco2Uatm * fugacityFactorAt(c.virialB, c.virialDelta, c.tempK, baroHpa, pco2Uatm, c.virialMoleFraction)
  );
}

/**
 * pCO2 (uatm) from fCO2 (uatm): fixed point on the weak x dependence; two passes reach 1e-15 relative
 * because d ln(factor)/dx is only about 4 delta P/(R T) = 0.004.
 */
export function pco2FromFco2(c: EquilibriumConstants, fco2Uatm: number, baroHpa = STANDARD_BARO_HPA): number {
  let p =
    fco2Uatm / fugacityFactorAt(c.virialB, c.virialDelta, c.tempK, baroHpa, fco2Uatm, c.virialMoleFraction);
  p = fco2Uatm / fugacityFactorAt(c.virialB, c.virialDelta, c.tempK, baroHpa, p, c.virialMoleFraction);
  p = fco2Uatm / fugacityFactorAt(c.virialB, c.virialDelta, c.tempK, baroHpa, p, c.virialMoleFraction);
  return p;
}

/**
 * pCO2 (uatm, wet at 100 % humidity) from the dry-air mole fraction xCO2 (umol/mol, ppm):
 * pCO2 = xCO2 (P - pw), P and pw in atm, pw at the sea-surface t and S (Weiss & Price 1980).
 * Check value: 400 ppm at 1013.25 hPa, S 35, t 25 degC gives 387.74 uatm (evaluated).
 */
export function pco2FromXco2(xco2Ppm: number, baroHpa: number, salinity: number, tempC: number): number {
  return xco2Ppm * (baroHpa / STANDARD_BARO_HPA - vapourPressureAtm(salinity, tempC));
}

/** xCO2 (ppm, dry air) from a wet pCO2 (uatm): the inverse of pco2FromXco2. */
export function xco2FromPco2(pco2Uatm: number, baroHpa: number, salinity: number, tempC: number): number {
  return pco2Uatm / (baroHpa / STANDARD_BARO_HPA - vapourPressureAtm(salinity, tempC));
}

/**
 * pCO2 at t2 from pCO2 at t1 without any TA (docs/methods/carbonate.md 3.8 fallback): pCO2(t2) = pCO2(t1) exp[0.0423
 * (t2 - t1)] (Takahashi et al. 1993, Global Biogeochem. Cycles 7, 843-878). Flag results 3: with TA from
 * salinity, solveCarbonate with outTempC is better. Check value: +4.32 % per degC, 400 -> 417.28 uatm for
 * +1 degC (evaluated from the formula).
 */
export function pco2AtTemperatureTakahashi(pco2Uatm: number, fromTempC: number, toTempC: number): number {
  return pco2Uatm * Math.exp(0.0423 * (toTempC - fromTempC));
}
