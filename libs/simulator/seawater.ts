// Seawater basics the simulator needs (science spec 2.1 and 2.4), kept local until libs/seawater has an
// index: EOS-80 one-atmosphere density (Millero & Poisson 1981, Deep-Sea Res. 28A, 625-629) and oxygen
// solubility (Garcia & Gordon 1992, Limnol. Oceanogr. 37, 1307-1312, Benson & Krause fit in umol/kg).

/** Density of seawater at one atmosphere, kg m-3; S 0.5-43, t -2 to 40 degC (t68 ~ t90 here, < 0.003 degC
 * apart on a reef). Check: S 35, t 25 -> 1023.343 kg m-3 (science spec check values, EOS-80). */
export function densityKgM3(sal: number, tempC: number): number {
  const t = tempC * 1.00024; // t68 from t90
  const rhoW =
    999.842594 +
    6.793952e-2 * t -
    9.09529e-3 * t ** 2 +
    1.001685e-4 * t ** 3 -
    1.120083e-6 * t ** 4 +
    6.536332e-9 * t ** 5;
  const a = 8.24493e-1 - 4.0899e-3 * t + 7.6438e-5 * t ** 2 - 8.2467e-7 * t ** 3 + 5.3875e-9 * t ** 4;
  const b = -5.72466e-3 + 1.0227e-4 * t - 1.6546e-6 * t ** 2;
  const c = 4.8314e-4;
  return rhoW + a * sal + b * sal ** 1.5 + c * sal ** 2;
}

const B = [-7.01577e-3, -7.70028e-3, -1.13864e-2, -9.51519e-3] as const;
const C0 = -2.75915e-7;

function scaledTemp(tempC: number): number {
  return Math.log((298.15 - tempC) / (273.15 + tempC));
}

/** O2 in equilibrium with water-saturated air at 1 atm, umol/kg; t 0-40 degC, S 0-42.
 * Check: S 35, t 10 -> 274.610 umol/kg (Garcia & Gordon 1992, via the science spec check values). */
export function o2SolubilityUmolKg(sal: number, tempC: number): number {
  const ts = scaledTemp(tempC);
  const lnC =
    5.80871 +
    3.20291 * ts +
    4.17887 * ts ** 2 +
    5.10006 * ts ** 3 -
    9.86643e-2 * ts ** 4 +
    3.80369 * ts ** 5 +
    sal * (B[0] + B[1] * ts + B[2] * ts ** 2 + B[3] * ts ** 3) +
    C0 * sal ** 2;
  return Math.exp(lnC);
}

/** The factor an optode set to salinity `salSetting` applies relative to the true salinity: the reading it
 * reports is O2_true / factor (science spec 2.4, re-compensation, inverted). Dimensionless. */
export function optodeSalinityFactor(sal: number, salSetting: number, tempC: number): number {
  const ts = scaledTemp(tempC);
  return Math.exp(
    (sal - salSetting) * (B[0] + B[1] * ts + B[2] * ts ** 2 + B[3] * ts ** 3) +
      C0 * (sal ** 2 - salSetting ** 2),
  );
}

/** 1000/31.9988: umol per mg of O2 (science spec 2.3). */
export const UMOL_PER_MG_O2 = 31.2512;

/** umol/kg to mg/L at the in-situ density. */
export function o2UmolKgToMgL(o2UmolKg: number, rhoKgM3: number): number {
  return (o2UmolKg * rhoKgM3) / 1000 / UMOL_PER_MG_O2;
}
