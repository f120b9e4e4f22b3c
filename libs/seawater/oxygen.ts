// Dissolved oxygen (science.md 2.3-2.4): solubility after Garcia H.E. & Gordon L.I. (1992), Limnol. Oceanogr.
// 37, 1307-1312 (Benson & Krause data), the local-pressure correction of Benson B.B. & Krause D. (1984),
// Limnol. Oceanogr. 29, 620-632, unit conversions, and optode salinity re-compensation (Bittig et al. 2018).
import { vapourPressureAtm } from './vapour.js';

/** umol per mg of O2: 1000/31.9988 (M(O2) = 31.9988 g/mol). */
export const MG_L_TO_UMOL_L = 1000 / 31.9988;
/** umol/L per mL/L: 1000/22.3916 (molar volume of O2 at STP, Garcia & Gordon 1992), from memory. */
export const ML_L_TO_UMOL_L = 44.6596;

// Garcia & Gordon (1992) Table 1, fit to the Benson & Krause data, umol/kg (from memory: verified against
// the published check value 274.610 umol/kg at S 35, t 10 degC in oxygen.test.ts).
const A_UMOL_KG = [5.80871, 3.20291, 4.17887, 5.10006, -9.86643e-2, 3.80369] as const;
const B_UMOL_KG = [-7.01577e-3, -7.70028e-3, -1.13864e-2, -9.51519e-3] as const;
const C0_UMOL_KG = -2.75915e-7;

/** Salinity coefficients an optode may have applied (science.md 2.4 table, mL/L fits). */
export const OPTODE_SALINITY_FITS = {
  /** Garcia & Gordon (1992) "combined fit": the usual optode default. */
  combined: { B: [-6.24097e-3, -6.93498e-3, -6.90358e-3, -4.29155e-3] as const, C0: -3.1168e-7 },
  /** Garcia & Gordon (1992) fit to Benson & Krause, mL/L. */
  bensonKrause: { B: [-6.24523e-3, -7.37614e-3, -1.0341e-2, -8.17083e-3] as const, C0: -4.88682e-7 },
} as const;
export type OptodeSalinityFit = keyof typeof OPTODE_SALINITY_FITS;

/** The scaled temperature of Garcia & Gordon: Ts = ln[(298.15 - t)/(273.15 + t)]. */
export function scaledTemperature(tempC: number): number {
  return Math.log((298.15 - tempC) / (273.15 + tempC));
}

/**
 * O2 solubility [umol/kg] in equilibrium with water-saturated air at 1 atm total pressure.
 * Valid t from freezing to 40 degC, S 0-42. Check value: 274.610 umol/kg at S 35, t 10 degC
 * (Garcia & Gordon 1992).
 */
export function o2SolubilityUmolKg(salinity: number, tempC: number): number {
  const ts = scaledTemperature(tempC);
  const [a0, a1, a2, a3, a4, a5] = A_UMOL_KG;
  const [b0, b1, b2, b3] = B_UMOL_KG;
  const lnC =
    a0 +
    ts * (a1 + ts * (a2 + ts * (a3 + ts * (a4 + ts * a5)))) +
    salinity * (b0 + ts * (b1 + ts * (b2 + ts * b3))) +
    C0_UMOL_KG * salinity * salinity;
  return Math.exp(lnC);
}

/**
 * O2 solubility at a total pressure P [atm] (Benson & Krause 1984):
 * O2*(P) = O2*(1) (P - pw)(1 - theta0 P)/[(1 - pw)(1 - theta0)], theta0 = 0.000975 - 1.426e-5 t + 6.436e-8 t^2
 * (from memory: verify against the original paper). Exactly O2*(1) at P = 1.
 */
export function o2SolubilityAtPressureUmolKg(salinity: number, tempC: number, pressureAtm: number): number {
  const pw = vapourPressureAtm(salinity, tempC);
  const theta0 = 0.000975 - 1.426e-5 * tempC + 6.436e-8 * tempC * tempC;
  return (
    (o2SolubilityUmolKg(salinity, tempC) * (pressureAtm - pw) * (1 - theta0 * pressureAtm)) /
    ((1 - pw) * (1 - theta0))
  );
}

/** Percent saturation of an O2 concentration [umol/kg] at total pressure P [atm] (default 1). */
export function o2SaturationPct(o2UmolKg: number, salinity: number, tempC: number, pressureAtm = 1): number {
  return (100 * o2UmolKg) / o2SolubilityAtPressureUmolKg(salinity, tempC, pressureAtm);
}

/** umol/L to umol/kg with the density at the measurement temperature [kg m-3]. */
export function umolLToUmolKg(umolL: number, rhoKgM3: number): number {
  return (umolL * 1000) / rhoKgM3;
}

export function umolKgToUmolL(umolKg: number, rhoKgM3: number): number {
  return (umolKg * rhoKgM3) / 1000;
}

export function umolKgToMgL(umolKg: number, rhoKgM3: number): number {
  return umolKgToUmolL(umolKg, rhoKgM3) / MG_L_TO_UMOL_L;
}

export function mgLToUmolKg(mgL: number, rhoKgM3: number): number {
  return umolLToUmolKg(mgL * MG_L_TO_UMOL_L, rhoKgM3);
}

/**
 * Re-compensates an optode concentration computed for salinity S_set to the measured salinity S
 * (science.md 2.4): O2(S) = O2(S_set) exp[(S - S_set)(B0 + B1 Ts + B2 Ts^2 + B3 Ts^3) + C0 (S^2 - S_set^2)],
 * with Ts from the optode temperature and the B, C set the instrument applied (default the combined fit).
 * Units are those of the input. An optode set to 0 reads ~20 % high in S 35 water; this removes that.
 */
export function recompensateO2Salinity(
  o2: number,
  salSetting: number,
  salinity: number,
  tempC: number,
  fit: OptodeSalinityFit = 'combined',
): number {
  const { B, C0 } = OPTODE_SALINITY_FITS[fit];
  const ts = scaledTemperature(tempC);
  const poly = B[0] + ts * (B[1] + ts * (B[2] + ts * B[3]));
  return o2 * Math.exp((salinity - salSetting) * poly + C0 * (salinity * salinity - salSetting * salSetting));
}
