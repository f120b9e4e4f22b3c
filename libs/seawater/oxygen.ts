// Oxygen solubility, units and optode salinity re-compensation (docs/methods/seawater.md 2.3, 2.4).
// Garcia H.E. & Gordon L.I. (1992), Limnol. Oceanogr. 37, 1307-1312: O2 solubility fits to the data of
// Benson & Krause (1984), Limnol. Oceanogr. 29, 620-632 (pressure correction); optode practice after
// Bittig et al. (2018), Front. Mar. Sci. 5, 429.

import { densityEos80 } from './density.js';
import { vapourPressureAtm } from './vapour.js';

/** Coefficients of one Garcia & Gordon (1992) fit: A0..A5, B0..B3, C0. */
export interface GarciaGordonCoefficients {
  readonly a: readonly [number, number, number, number, number, number];
  readonly b: readonly [number, number, number, number];
  readonly c0: number;
}

/** Benson & Krause data, umol/kg (GG92 Table 1; the default for O2*). */
export const GG92_BK_UMOL_KG: GarciaGordonCoefficients = {
  a: [5.80871, 3.20291, 4.17887, 5.10006, -9.86643e-2, 3.80369],
  b: [-7.01577e-3, -7.70028e-3, -1.13864e-2, -9.51519e-3],
  c0: -2.75915e-7,
};
/** Benson & Krause data, mL/L. */
export const GG92_BK_ML_L: GarciaGordonCoefficients = {
  a: [2.00907, 3.22014, 4.0501, 4.94457, -2.56847e-1, 3.88767],
  b: [-6.24523e-3, -7.37614e-3, -1.0341e-2, -8.17083e-3],
  c0: -4.88682e-7,
};
/** "Combined fit" (Benson & Krause with Weiss 1970), mL/L: what optodes usually apply for salinity. */
export const GG92_COMBINED_ML_L: GarciaGordonCoefficients = {
  a: [2.00856, 3.224, 3.99063, 4.80299, 9.78188e-1, 1.71069],
  b: [-6.24097e-3, -6.93498e-3, -6.90358e-3, -4.29155e-3],
  c0: -3.1168e-7,
};

/** O2 molar mass, g/mol; 1000/31.9988 = 31.2512 umol per mg. */
export const O2_MOLAR_MASS = 31.9988;
/** umol per mL of O2 at STP (22.3916 L/mol, Garcia & Gordon 1992). */
export const UMOL_PER_ML_O2 = 44.6596;

/** Scaled temperature Ts = ln[(298.15 - t)/(273.15 + t)] of Garcia & Gordon (1992). */
export function scaledTemperature(tempC: number): number {
  return Math.log((298.15 - tempC) / (273.15 + tempC));
}

/** ln O2* of one fit. */
function lnSolubility(k: GarciaGordonCoefficients, salinity: number, tempC: number): number {
  const ts = scaledTemperature(tempC);
  const a = k.a;
  const b = k.b;
  return (
    a[0] +
    ts * (a[1] + ts * (a[2] + ts * (a[3] + ts * (a[4] + ts * a[5])))) +
    salinity * (b[0] + ts * (b[1] + ts * (b[2] + ts * b[3]))) +
    k.c0 * salinity * salinity
  );
}

/**
 * O2* (umol/kg) in equilibrium with water-saturated air at 1 atm total pressure, Benson & Krause fit of
 * Garcia & Gordon (1992). Valid t from freezing to 40 degC, S 0-42.
 * Check value: 274.610 umol/kg at S 35, t 10 degC (Garcia & Gordon 1992).
 */
export function o2SolubilityUmolKg(salinity: number, tempC: number): number {
  return Math.exp(lnSolubility(GG92_BK_UMOL_KG, salinity, tempC));
}

/**
 * O2* (mL/L) at 1 atm, Benson & Krause fit (default) or the combined fit.
 * Check value: 6.315 mL/L at S 35, t 10 degC, Benson & Krause fit (Garcia & Gordon 1992).
 */
export function o2SolubilityMlL(
  salinity: number,
  tempC: number,
  fit: GarciaGordonCoefficients = GG92_BK_ML_L,
): number {
  return Math.exp(lnSolubility(fit, salinity, tempC));
}

/**
 * O2* (umol/kg) at total pressure P (atm) instead of 1 atm (Benson & Krause 1984):
 * O2*(P) = O2*(1) (P - pw)(1 - theta0 P) / [(1 - pw)(1 - theta0)], theta0 = 0.000975 - 1.426e-5 t +
 * 6.436e-8 t^2, pw from Weiss & Price (1980). Check value: equal to o2SolubilityUmolKg at P = 1 exactly.
 */
export function o2SolubilityAtPressureUmolKg(salinity: number, tempC: number, pressureAtm: number): number {
  const pw = vapourPressureAtm(salinity, tempC);
  const theta0 = 0.000975 - 1.426e-5 * tempC + 6.436e-8 * tempC * tempC;
  return (
    (o2SolubilityUmolKg(salinity, tempC) * (pressureAtm - pw) * (1 - theta0 * pressureAtm)) /
    ((1 - pw) * (1 - theta0))
  );
}

/** umol/L from mg/L (x 31.2512). */
export function o2UmolLFromMgL(mgL: number): number {
  return (mgL * 1000) / O2_MOLAR_MASS;
}
/** mg/L from umol/L. */
export function o2MgLFromUmolL(umolL: number): number {
  return (umolL * O2_MOLAR_MASS) / 1000;
}
/** umol/L from mL/L (x 44.6596). */
export function o2UmolLFromMlL(mlL: number): number {
  return mlL * UMOL_PER_ML_O2;
}
/** umol/kg from umol/L with the density at the measurement temperature (docs/methods/seawater.md 2.3). */
export function o2UmolKgFromUmolL(umolL: number, salinity: number, tempC: number): number {
  return (umolL * 1000) / densityEos80(salinity, tempC);
}
/** umol/L from umol/kg. */
export function o2UmolLFromUmolKg(umolKg: number, salinity: number, tempC: number): number {
  return (umolKg * densityEos80(salinity, tempC)) / 1000;
}
/** mg/L from umol/kg: C[umol/kg] (rho/1000)/31.2512. */
export function o2MgLFromUmolKg(umolKg: number, salinity: number, tempC: number): number {
  return o2MgLFromUmolL(o2UmolLFromUmolKg(umolKg, salinity, tempC));
}
/** umol/kg from mg/L. */
export function o2UmolKgFromMgL(mgL: number, salinity: number, tempC: number): number {
  return o2UmolKgFromUmolL(o2UmolLFromMgL(mgL), salinity, tempC);
}
/** Percent saturation 100 O2/O2*(S, t, P), P in atm (default 1). */
export function o2SatPct(umolKg: number, salinity: number, tempC: number, pressureAtm = 1): number {
  return (100 * umolKg) / o2SolubilityAtPressureUmolKg(salinity, tempC, pressureAtm);
}
/** umol/kg from an instrument's percent saturation at its reference pressure (default 1 atm). */
export function o2UmolKgFromSatPct(satPct: number, salinity: number, tempC: number, pressureAtm = 1): number {
  return (satPct / 100) * o2SolubilityAtPressureUmolKg(salinity, tempC, pressureAtm);
}

/**
 * Optode salinity re-compensation from the instrument's salinity setting S_set to the measured S
 * (docs/methods/seawater.md 2.4): O2(S) = O2(S_set) exp[(S - S_set)(B0 + B1 Ts + B2 Ts^2 + B3 Ts^3) + C0 (S^2 - S_set^2)],
 * Ts from the optode temperature, B and C of the fit the instrument applied (default the combined fit).
 * Works in any concentration unit (it is a ratio). Check value: S_set 0 to S 35 at 10 degC multiplies by
 * O2*(35)/O2*(0) of the same fit, 0.80000 for the combined fit (evaluated; oxygen.test.ts).
 */
export function recompensateO2Salinity(
  o2AtSetting: number,
  tempC: number,
  salinity: number,
  salSetting: number,
  fit: GarciaGordonCoefficients = GG92_COMBINED_ML_L,
): number {
  const ts = scaledTemperature(tempC);
  const b = fit.b;
  const bTerm = b[0] + ts * (b[1] + ts * (b[2] + ts * b[3]));
  return (
    o2AtSetting *
    Math.exp((salinity - salSetting) * bTerm + fit.c0 * (salinity * salinity - salSetting * salSetting))
  );
}
